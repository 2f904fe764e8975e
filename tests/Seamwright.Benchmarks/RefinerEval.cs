using System.Diagnostics;
using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Tests.Estimation;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// Quick evaluation (not BenchmarkDotNet): per homogr pair, plain RANSAC at 3 px then the
/// refinement, with consensus, LP count, model build time, GLOP solve time and total time.
/// Run: dotnet run -c Release --project tests/Seamwright.Benchmarks -- eval-refiner [repeats]
/// </summary>
internal static class RefinerEval
{
    public static int Run(int repeats)
    {
        var set = HomogrSet.TryLoad();
        if (set is null)
        {
            Console.Error.WriteLine("homogr set missing at " + RepoPaths.HomogrFolder);
            return 1;
        }
        var inv = CultureInfo.InvariantCulture;
        var options = new ConsensusRefinerOptions();
        var perPairTotal = new List<double>();
        var perPairSampling = new List<double>();
        var perPairCpu = new List<double>();
        int before = 0, after = 0, lps = 0;
        double build = 0, solve = 0, refine = 0;
        Console.WriteLine("pair            n  before after LPs  sampling_ms refine_ms build_ms solve_ms");
        foreach (var pair in set)
        {
            double bestSampling = double.MaxValue, bestRefine = double.MaxValue, bestCpu = double.MaxValue;
            ConsensusRefinement? r = null;
            for (int k = 0; k < repeats; k++)
            {
                double cpu0 = ThreadCpuClock.NowMilliseconds();
                long t0 = Stopwatch.GetTimestamp();
                var initial = PlainRansac.Estimate(pair.Tentative, MotionModel.Homography, 3, 1, 10_000);
                long t1 = Stopwatch.GetTimestamp();
                var run = ConsensusRefiner.Refine(pair.Tentative, initial.Model, MotionModel.Homography, 3, options);
                long t2 = Stopwatch.GetTimestamp();
                if (Stopwatch.GetElapsedTime(t1, t2).TotalMilliseconds < bestRefine)
                {
                    r = run;
                }
                bestCpu = Math.Min(bestCpu, ThreadCpuClock.NowMilliseconds() - cpu0);
                bestSampling = Math.Min(bestSampling, Stopwatch.GetElapsedTime(t0, t1).TotalMilliseconds);
                bestRefine = Math.Min(bestRefine, Stopwatch.GetElapsedTime(t1, t2).TotalMilliseconds);
            }
            before += r!.ConsensusBefore;
            after += r.ConsensusAfter;
            lps += r.LinearPrograms;
            build += r.BuildMilliseconds;
            solve += r.SolveMilliseconds;
            refine += bestRefine;
            perPairSampling.Add(bestSampling);
            perPairTotal.Add(bestSampling + bestRefine);
            perPairCpu.Add(bestCpu);
            Console.WriteLine(string.Format(inv, "{0,-14} {1,4} {2,6} {3,5} {4,4} {5,11:F1} {6,9:F1} {7,8:F1} {8,8:F1} it {9} cpu_ms {10:F1}",
                pair.Name, pair.Tentative.Length, r.ConsensusBefore, r.ConsensusAfter, r.LinearPrograms, bestSampling, bestRefine, r.BuildMilliseconds, r.SolveMilliseconds, r.SimplexIterations, bestCpu));
        }
        Console.WriteLine(string.Format(inv,
            "total consensus {0} -> {1}, {2} LPs; median ms/pair: sampling {3:F1}, sampling+refinement {4:F1}; refinement {5:F0} ms in all (model build {6:F0}, GLOP solves {7:F0} = {8:P0})",
            before, after, lps, Median(perPairSampling), Median(perPairTotal), refine, build, solve, solve / refine));
        Console.WriteLine(string.Format(inv, "thread CPU ms/pair (sampling+refinement): median {0:F1}, total {2:F0}; load average now {1}",
            Median(perPairCpu), File.Exists("/proc/loadavg") ? File.ReadAllText("/proc/loadavg").Trim() : "n/a", perPairCpu.Sum()));
        return 0;
    }

    private static double Median(List<double> values)
    {
        var s = values.Order().ToArray();
        return s.Length % 2 == 1 ? s[s.Length / 2] : (s[s.Length / 2 - 1] + s[s.Length / 2]) / 2;
    }
}
