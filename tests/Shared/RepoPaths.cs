namespace Seamwright.Tests.Shared;

/// <summary>Locates the repository root (the folder holding Seamwright.slnx) and the research data beside it.</summary>
internal static class RepoPaths
{
    public static string Root { get; } = FindRoot();

    /// <summary>The homogr research set, kept outside the repository in ../shared/data/homogr.</summary>
    public static string HomogrFolder => Path.GetFullPath(Path.Combine(Root, "..", "shared", "data", "homogr"));

    public static bool IsCi => string.Equals(Environment.GetEnvironmentVariable("CI"), "true", StringComparison.OrdinalIgnoreCase);

    private static string FindRoot()
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "Seamwright.slnx")))
        {
            dir = dir.Parent;
        }
        return dir?.FullName ?? throw new InvalidOperationException("Cannot find Seamwright.slnx above " + AppContext.BaseDirectory);
    }
}
