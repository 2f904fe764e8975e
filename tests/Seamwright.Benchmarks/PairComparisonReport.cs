using System.Globalization;
using OpenCvSharp;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// `dotnet run -c Release --project tests/Seamwright.Benchmarks -- pairs [repeats]`: runs both
/// pipelines on the 16 homogr pairs in one process, one thread each, alternating, and prints the
/// median per-pair times, the ratio, a stage breakdown and the accuracy table.
/// </summary>
internal static class PairComparisonReport
{
    public static int Run(string[] args)
    {
        var set = HomogrSet.TryLoad();
        if (set is null)
        {
            Console.Error.WriteLine("homogr set not found at " + RepoPaths.HomogrFolder);
            return 1;
        }
        int repeats = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 5;
        Cv2.SetNumThreads(1);
        // Warm up both (JIT, native library load).
        PairPipelines.Seamwright(set[0]);
        PairPipelines.OpenCvOrb(set[0]);
        var ours = new List<PairRun>();
        var theirs = new List<PairRun>();
        foreach (var pair in set)
        {
            var runsA = new List<PairRun>();
            var runsB = new List<PairRun>();
            for (int r = 0; r < repeats; r++)
            {
                runsA.Add(PairPipelines.Seamwright(pair));
                runsB.Add(PairPipelines.OpenCvOrb(pair));
            }
            ours.Add(MedianRun(runsA));
            theirs.Add(MedianRun(runsB));
        }
        var inv = CultureInfo.InvariantCulture;
        Console.WriteLine($"homogr pairs, {repeats} runs each, median per pair, decoding included, one thread ({HomogrSet.Source})");
        Console.WriteLine();
        Console.WriteLine("| pair | seamwright ms | seamwright err px | opencv-orb ms | opencv-orb err px |");
        Console.WriteLine("|---|---:|---:|---:|---:|");
        for (int i = 0; i < set.Count; i++)
        {
            Console.WriteLine(string.Create(inv, $"| {set[i].Name} | {ours[i].TotalMs:F0} | {Err(ours[i].ErrorPx)} | {theirs[i].TotalMs:F0} | {Err(theirs[i].ErrorPx)} |"));
        }
        Console.WriteLine();
        double mo = Median(ours.Select(r => r.TotalMs)), mt = Median(theirs.Select(r => r.TotalMs));
        Console.WriteLine(string.Create(inv, $"median per-pair time: seamwright {mo:F1} ms, opencv-orb {mt:F1} ms, ratio {mo / mt:F2} (target <= 1.5)"));
        foreach (var (name, runs) in new[] { ("seamwright", ours), ("opencv-orb", theirs) })
        {
            int good = runs.Count(r => r.ErrorPx < 10);
            Console.WriteLine(string.Create(inv, $"{name}: {good}/16 under 10 px, median error {Median(runs.Select(r => r.ErrorPx)):F2} px"));
            var stages = string.Join(", ", runs[0].StagesMs.Keys.Select(k => string.Create(inv, $"{k} {Median(runs.Select(r => r.StagesMs[k])):F1}")));
            Console.WriteLine($"  stage medians (ms): {stages}");
        }
        return 0;
    }

    private static string Err(double e) => double.IsFinite(e) ? e.ToString("F2", CultureInfo.InvariantCulture) : "none";

    private static PairRun MedianRun(List<PairRun> runs) => runs.OrderBy(r => r.TotalMs).ElementAt(runs.Count / 2);

    private static double Median(IEnumerable<double> values)
    {
        var v = values.Order().ToArray();
        return v.Length % 2 == 1 ? v[v.Length / 2] : 0.5 * (v[v.Length / 2 - 1] + v[v.Length / 2]);
    }
}
