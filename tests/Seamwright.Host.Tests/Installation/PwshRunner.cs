using System.Diagnostics;
using Seamwright.Tests.Shared;

namespace Seamwright.Host.Tests.Installation;

/// <summary>Runs PowerShell 7.6.9 from the repository's local tool manifest (dotnet-tools.json).</summary>
internal static class PwshRunner
{
    private static readonly Lazy<string?> Unavailable = new(Probe);

    /// <summary>Why pwsh cannot run here, or null when it can.</summary>
    public static string? WhyUnavailable => Unavailable.Value;

    public static (int ExitCode, string StdOut, string StdErr) Run(params string[] pwshArguments)
    {
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = RepoPaths.Root,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (var a in new[] { "tool", "run", "pwsh", "--", "-NoProfile", "-NonInteractive" })
        {
            start.ArgumentList.Add(a);
        }
        foreach (var a in pwshArguments)
        {
            start.ArgumentList.Add(a);
        }
        // Plain text: no ANSI colour codes in captured output.
        start.Environment["NO_COLOR"] = "1";
        start.Environment["TERM"] = "dumb";
        using var process = Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start");
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        process.WaitForExit();
        return (process.ExitCode, stdout.Result, stderr.Result);
    }

    private static string? Probe()
    {
        var (code, output, error) = Run("-Command", "$PSVersionTable.PSVersion.ToString()");
        if (code != 0)
        {
            // A fresh clone has not restored the tool yet; do it once.
            using var restore = Process.Start(new ProcessStartInfo("dotnet", "tool restore") { WorkingDirectory = RepoPaths.Root, RedirectStandardOutput = true });
            restore?.WaitForExit();
            (code, output, error) = Run("-Command", "$PSVersionTable.PSVersion.ToString()");
        }
        if (code != 0)
        {
            return $"pwsh from dotnet-tools.json did not run (exit {code}): {error.Trim()}";
        }
        return output.Trim() == "7.6.9" ? null : $"expected PowerShell 7.6.9 from dotnet-tools.json, got '{output.Trim()}'";
    }
}
