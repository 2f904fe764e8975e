using Seamwright.Host.Supervision;

namespace Seamwright.Host.Tests.Supervision;

internal static class WorkerTestSupport
{
    /// <summary>The real `seamwright` program copied beside the tests (apphost, else the dll through dotnet).</summary>
    public static WorkerLaunch Launch
    {
        get
        {
            string apphost = Path.Combine(AppContext.BaseDirectory, OperatingSystem.IsWindows() ? "seamwright.exe" : "seamwright");
            return File.Exists(apphost)
                ? new WorkerLaunch(apphost, ["worker"])
                : WorkerLaunch.ForAssembly(Path.Combine(AppContext.BaseDirectory, "seamwright.dll"));
        }
    }

    /// <summary>Environment that turns on the worker's test-only fault hooks for the named files.</summary>
    public static Dictionary<string, string> Faults(string spec) => new()
    {
        ["SEAMWRIGHT_TEST_HOOKS"] = "1",
        ["SEAMWRIGHT_TEST_FAULTS"] = spec,
    };

    public static string TempFolder(string prefix) => Directory.CreateTempSubdirectory(prefix).FullName;
}
