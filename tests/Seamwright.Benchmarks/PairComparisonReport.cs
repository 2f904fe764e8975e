using System.Globalization;
using OpenCvSharp;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// `dotnet run -c Release --project tests/Seamwright.Benchmarks -- pairs [repeats] [--set homogr|oxford]`:
/// runs our `pair` flow (second look and tilted views included where they run), the OpenCvSharp ORB
/// pipeline and the OpenCvSharp SIFT pipeline on the homogr and Oxford pairs in one process, one thread
/// each, alternating, and prints per pair the median-time run's error and time, then per set the count
/// within 5 px, the median error and the warm per-pair times with their ratio to ORB in the same run.
/// `pairs cold EXECUTABLE ...` times fresh `seamwright pair` processes instead (<see cref="ColdPairReport"/>).
/// </summary>
internal static class PairComparisonReport
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    public static int Run(string[] args)
    {
        if (args.Length > 0 && args[0] == "cold")
        {
            return ColdPairReport.Run(args[1..]);
        }
        var (repeats, sets, rest) = ParseCommon(args);
        if (rest.Count > 0)
        {
            Console.Error.WriteLine("usage: pairs [repeats] [--set homogr|oxford]... | pairs cold EXECUTABLE [repeats] [--set homogr|oxford]...");
            return 2;
        }
        if (sets is null)
        {
            return 1;
        }
        Cv2.SetNumThreads(1);
        // Warm up every pipeline (JIT, native library load).
        PairPipelines.Seamwright(sets[0].Pairs[0]);
        PairPipelines.OpenCvOrb(sets[0].Pairs[0]);
        PairPipelines.OpenCvSift(sets[0].Pairs[0]);
        Console.WriteLine($"{repeats} runs per pair and pipeline, alternating; per pair the run of median time; decoding included; " +
            $"one thread each (ours uses more for the tilted views only); started {DateTime.UtcNow:yyyy-MM-dd HH:mm} UTC, load average {LoadAverage()}");
        var summary = new List<string>();
        foreach (var (name, source, pairs) in sets)
        {
            var runs = new Dictionary<string, List<PairRun>> { ["seamwright"] = [], ["opencv-orb"] = [], ["opencv-sift"] = [] };
            foreach (var pair in pairs)
            {
                var these = new Dictionary<string, List<PairRun>> { ["seamwright"] = [], ["opencv-orb"] = [], ["opencv-sift"] = [] };
                for (int r = 0; r < repeats; r++)
                {
                    these["seamwright"].Add(PairPipelines.Seamwright(pair));
                    these["opencv-orb"].Add(PairPipelines.OpenCvOrb(pair));
                    these["opencv-sift"].Add(PairPipelines.OpenCvSift(pair));
                }
                foreach (var (k, v) in these)
                {
                    runs[k].Add(MedianRun(v));
                }
                Console.Error.WriteLine(string.Create(Inv, $"{name} {pair.Name}: {string.Join(", ", runs.Select(r => $"{r.Key} {Err(r.Value[^1].ErrorPx)} px {r.Value[^1].TotalMs:F0} ms"))}"));
            }
            Console.WriteLine();
            Console.WriteLine($"{name} ({source}); error: {(name == "oxford" ? "the set README's 10 x 10 grid error" : "mean transfer error over the annotated validation pairs")}, px");
            Console.WriteLine();
            Console.WriteLine("| pair | seamwright err | path | ms | opencv-orb err | ms | opencv-sift err | ms |");
            Console.WriteLine("|---|---:|---|---:|---:|---:|---:|---:|");
            for (int i = 0; i < pairs.Count; i++)
            {
                var (o, b, s) = (runs["seamwright"][i], runs["opencv-orb"][i], runs["opencv-sift"][i]);
                Console.WriteLine(string.Create(Inv, $"| {pairs[i].Name} | {Err(o.ErrorPx)} | {o.Path} | {o.TotalMs:F0} | {Err(b.ErrorPx)} | {b.TotalMs:F0} | {Err(s.ErrorPx)} | {s.TotalMs:F0} |"));
            }
            var orb = runs["opencv-orb"];
            foreach (var (k, v) in runs)
            {
                int within5 = v.Count(r => r.ErrorPx <= 5), under10 = v.Count(r => r.ErrorPx < 10);
                double medianMs = Median(v.Select(r => r.TotalMs)), meanMs = v.Average(r => r.TotalMs), meanCpu = v.Average(r => r.CpuMs);
                summary.Add(string.Create(Inv,
                    $"| {name} | {k} | {within5}/{v.Count} | {under10}/{v.Count} | {Median(v.Select(r => r.ErrorPx)):F2} | {medianMs:F0} | {meanMs:F0} | {meanCpu:F0} | " +
                    $"{medianMs / Median(orb.Select(r => r.TotalMs)):F2} | {meanMs / orb.Average(r => r.TotalMs):F2} | {meanCpu / orb.Average(r => r.CpuMs):F2} |"));
            }
            var ours = runs["seamwright"];
            var paths = string.Join(", ", ours.GroupBy(r => r.Path).OrderBy(g => g.Key, StringComparer.Ordinal).Select(g => $"{g.Key} {g.Count()}"));
            var stages = string.Join(", ", ours[0].StagesMs.Keys.Select(s => string.Create(Inv, $"{s} {ours.Average(r => r.StagesMs[s]):F1}")));
            Console.WriteLine();
            Console.WriteLine($"seamwright paths: {paths}; stage means (ms): {stages}");
        }
        Console.WriteLine();
        Console.WriteLine("| set | pipeline | within 5 px | under 10 px | median error px | median ms | mean ms | mean process CPU ms | median / ORB | mean / ORB | CPU / ORB |");
        Console.WriteLine("|---|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|");
        foreach (var line in summary)
        {
            Console.WriteLine(line);
        }
        Console.WriteLine($"finished {DateTime.UtcNow:yyyy-MM-dd HH:mm} UTC, load average {LoadAverage()}");
        return 0;
    }

    /// <summary>Repeats (default 3), the chosen sets (both when none is named; null after printing why one is missing) and the arguments left over.</summary>
    internal static (int Repeats, IReadOnlyList<(string Name, string Source, IReadOnlyList<BenchmarkPair> Pairs)>? Sets, List<string> Unknown) ParseCommon(string[] args)
    {
        int repeats = 3;
        var names = new List<string>();
        var rest = new List<string>();
        for (int i = 0; i < args.Length; i++)
        {
            if (args[i] == "--set" && i + 1 < args.Length)
            {
                names.Add(args[++i]);
            }
            else if (int.TryParse(args[i], NumberStyles.Integer, Inv, out int n) && n > 0)
            {
                repeats = n;
            }
            else
            {
                rest.Add(args[i]);
            }
        }
        if (names.Count == 0)
        {
            names = ["homogr", "oxford"];
        }
        var sets = new List<(string, string, IReadOnlyList<BenchmarkPair>)>();
        foreach (var name in names)
        {
            switch (name)
            {
                case "homogr" when HomogrSet.TryLoad() is { } h:
                    sets.Add((name, HomogrSet.Source, BenchmarkPair.Homogr(h)));
                    break;
                case "oxford" when OxfordSet.TryLoad() is { } o:
                    sets.Add((name, OxfordSet.Source, BenchmarkPair.Oxford(o)));
                    break;
                case "homogr" or "oxford":
                    Console.Error.WriteLine($"{name} set not found ({(name == "homogr" ? RepoPaths.HomogrFolder : OxfordSet.Folder)})");
                    return (repeats, null, rest);
                default:
                    rest.Add("--set " + name);
                    break;
            }
        }
        return (repeats, sets, rest);
    }

    internal static string LoadAverage()
    {
        try
        {
            return File.ReadAllText("/proc/loadavg").Split(' ')[0];
        }
        catch (IOException)
        {
            return "unknown";
        }
    }

    internal static string Err(double e) => double.IsFinite(e) ? e.ToString("F2", Inv) : "none";

    private static PairRun MedianRun(List<PairRun> runs) => runs.OrderBy(r => r.TotalMs).ElementAt(runs.Count / 2);

    internal static double Median(IEnumerable<double> values)
    {
        var v = values.Order().ToArray();
        return v.Length % 2 == 1 ? v[v.Length / 2] : 0.5 * (v[v.Length / 2 - 1] + v[v.Length / 2]);
    }
}
