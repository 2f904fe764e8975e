namespace Seamwright.Pipeline.Processing;

/// <summary>Where a set's outputs go under the output root (mirroring the set folders).</summary>
public static class OutputLayout
{
    public const string ManifestName = "seam-manifest.json";
    public const string TiesFolder = "seam-ties";
    public const string SidecarSuffix = ".seam.json";

    public static string SetFolder(string outputRoot, string setId) =>
        setId == "." ? outputRoot : Path.Combine(outputRoot, setId.Replace('/', Path.DirectorySeparatorChar));

    /// <summary>Sidecar path relative to the set's output folder ('/' separators).</summary>
    public static string SidecarRelative(string imageKey) => imageKey + SidecarSuffix;

    /// <summary>Tie-point file relative to the set's output folder ('/' separators).</summary>
    public static string TiesRelative(string keyA, string keyB) => TiesFolder + "/" + Flat(keyA) + "+" + Flat(keyB) + ".json";

    public static string Full(string setFolder, string relative) => Path.Combine(setFolder, relative.Replace('/', Path.DirectorySeparatorChar));

    private static string Flat(string key) => key.Replace("/", "__", StringComparison.Ordinal);
}
