using System.Diagnostics;
using System.Globalization;
using System.Text.Json;

namespace Seamwright.Benchmarks;

/// <summary>
/// `pairs cold EXECUTABLE [repeats] [--set homogr|oxford]`: per pair, the wall time of a fresh
/// `seamwright pair A B --json` process (measured outside it: runtime start, loading of our code and,
/// without ahead-of-time code, just-in-time compilation included) against the warm in-process time of
/// the same work (our flow with the two images' features side by side, as the command does it, after
/// every code path has run once). EXECUTABLE is the published `seamwright` (ahead-of-time code:
/// `dotnet publish src/Seamwright.Host -c Release -r linux-x64 -o DIR`) or a built `seamwright.dll`.
/// Medians over the repeats of each.
/// </summary>
internal static class ColdPairReport
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    public static int Run(string[] args)
    {
        if (args.Length == 0 || !File.Exists(args[0]))
        {
            Console.Error.WriteLine("usage: pairs cold EXECUTABLE [repeats] [--set homogr|oxford]... (EXECUTABLE: published seamwright or seamwright.dll)");
            return 2;
        }
        string exe = Path.GetFullPath(args[0]);
        var (repeats, sets, rest) = PairComparisonReport.ParseCommon(args[1..]);
        if (sets is null || rest.Count > 0)
        {
            return sets is null ? 1 : 2;
        }
        var all = sets.SelectMany(s => s.Pairs).ToList();
        // Warm: every pair once first, so that every code path (second look, tilted views) has been compiled.
        foreach (var pair in all)
        {
            PairPipelines.Seamwright(pair, parallelFeatures: true);
        }
        Console.WriteLine($"cold: fresh `{Path.GetFileName(exe)} pair A B --json` processes, wall time measured outside; warm: the same flow in this process " +
            $"(features of both images side by side, as the command does); {repeats} of each per pair, medians; started {DateTime.UtcNow:yyyy-MM-dd HH:mm} UTC, load average {PairComparisonReport.LoadAverage()}");
        Console.WriteLine();
        Console.WriteLine("| set | pair | path | warm ms | cold ms (outside) | cold ms (own total) | cold / warm |");
        Console.WriteLine("|---|---|---|---:|---:|---:|---:|");
        var ratios = new List<double>();
        double sumWarm = 0, sumCold = 0;
        foreach (var pair in all)
        {
            var warm = new List<PairRun>();
            var cold = new List<(double Wall, double Own)>();
            for (int r = 0; r < repeats; r++)
            {
                warm.Add(PairPipelines.Seamwright(pair, parallelFeatures: true));
                cold.Add(Fresh(exe, pair));
            }
            double w = PairComparisonReport.Median(warm.Select(x => x.TotalMs));
            double c = PairComparisonReport.Median(cold.Select(x => x.Wall));
            double own = PairComparisonReport.Median(cold.Select(x => x.Own));
            ratios.Add(c / w);
            sumWarm += w;
            sumCold += c;
            Console.WriteLine(string.Create(Inv, $"| {pair.Set} | {pair.Name} | {warm[0].Path} | {w:F0} | {c:F0} | {own:F0} | {c / w:F2} |"));
        }
        Console.WriteLine();
        Console.WriteLine(string.Create(Inv,
            $"cold / warm over {all.Count} pairs: median {PairComparisonReport.Median(ratios):F2}, worst {ratios.Max():F2}, sum of cold / sum of warm {sumCold / sumWarm:F2} (target <= 1.3)"));
        Console.WriteLine($"finished {DateTime.UtcNow:yyyy-MM-dd HH:mm} UTC, load average {PairComparisonReport.LoadAverage()}");
        return 0;
    }

    /// <summary>One fresh process: wall time from start to exit, and the total the process reports for itself.</summary>
    private static (double Wall, double Own) Fresh(string exe, BenchmarkPair pair)
    {
        bool dll = exe.EndsWith(".dll", StringComparison.OrdinalIgnoreCase);
        var psi = new ProcessStartInfo(dll ? Environment.GetEnvironmentVariable("DOTNET_HOST_PATH") ?? "dotnet" : exe)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        if (dll)
        {
            psi.ArgumentList.Add(exe);
        }
        foreach (var a in new[] { "pair", pair.ImageA, pair.ImageB, "--json" })
        {
            psi.ArgumentList.Add(a);
        }
        psi.Environment["DOTNET_CLI_TELEMETRY_OPTOUT"] = "1";
        long t0 = Stopwatch.GetTimestamp();
        using var p = Process.Start(psi) ?? throw new InvalidOperationException("could not start " + exe);
        var stderr = p.StandardError.ReadToEndAsync();
        string stdout = p.StandardOutput.ReadToEnd();
        p.WaitForExit();
        double wall = Stopwatch.GetElapsedTime(t0).TotalMilliseconds;
        if (p.ExitCode != 0)
        {
            throw new InvalidOperationException($"{exe} pair exited {p.ExitCode}: {stderr.Result}");
        }
        using var json = JsonDocument.Parse(stdout);
        double own = json.RootElement.GetProperty("timingsMs").GetProperty("total").GetDouble();
        return (wall, own);
    }
}
