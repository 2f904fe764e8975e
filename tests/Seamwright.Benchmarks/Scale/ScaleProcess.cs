using System.Diagnostics;
using System.Globalization;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// Runs the real <c>seamwright</c> executable as a child process and measures it from outside:
/// wall time, and peak resident memory polled from <c>/proc/&lt;pid&gt;/status</c> (VmHWM, the
/// kernel's high-water mark of the resident set) every 100 ms until the process exits.
/// </summary>
internal static class ScaleProcess
{
    internal sealed record Result(int ExitCode, TimeSpan Wall, long PeakRssBytes, string Output, string Errors);

    public static string Dll(string repoRoot) => Path.Combine(repoRoot, "src", "Seamwright.Host", "bin", "Release", "net10.0", "seamwright.dll");

    public static Result Run(string dll, IReadOnlyList<string> args)
    {
        if (!File.Exists(dll))
        {
            throw new FileNotFoundException($"{dll} not found: build the host first (dotnet build src/Seamwright.Host -c Release)", dll);
        }
        var psi = new ProcessStartInfo(Environment.GetEnvironmentVariable("DOTNET_HOST_PATH") ?? "dotnet")
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        psi.ArgumentList.Add(dll);
        foreach (var a in args)
        {
            psi.ArgumentList.Add(a);
        }
        psi.Environment["DOTNET_CLI_TELEMETRY_OPTOUT"] = "1";
        var output = new System.Text.StringBuilder();
        var errors = new System.Text.StringBuilder();
        using var p = new Process { StartInfo = psi };
        p.OutputDataReceived += (_, e) => { if (e.Data is not null) { lock (output) { output.AppendLine(e.Data); } } };
        p.ErrorDataReceived += (_, e) => { if (e.Data is not null) { lock (errors) { errors.AppendLine(e.Data); } } };
        var clock = Stopwatch.StartNew();
        p.Start();
        p.BeginOutputReadLine();
        p.BeginErrorReadLine();
        long peak = 0;
        while (!p.WaitForExit(100))
        {
            peak = Math.Max(peak, ReadHighWaterMark(p.Id));
        }
        p.WaitForExit();
        clock.Stop();
        lock (output)
        {
            lock (errors)
            {
                return new Result(p.ExitCode, clock.Elapsed, peak, output.ToString(), errors.ToString());
            }
        }
    }

    /// <summary>VmHWM of a live process in bytes (0 when it has gone).</summary>
    public static long ReadHighWaterMark(int pid)
    {
        try
        {
            foreach (string line in File.ReadLines($"/proc/{pid}/status"))
            {
                if (line.StartsWith("VmHWM:", StringComparison.Ordinal))
                {
                    var parts = line.Split(' ', StringSplitOptions.RemoveEmptyEntries);
                    return long.Parse(parts[1], CultureInfo.InvariantCulture) * 1024;
                }
            }
        }
        catch (IOException)
        {
        }
        catch (UnauthorizedAccessException)
        {
        }
        return 0;
    }
}
