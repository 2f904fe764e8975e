using System.Diagnostics;
using System.Globalization;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Core.Synthetic;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// <c>profile-forecast [tiles] [--exhaustive]</c>: the overlap forecast of a large grid without
/// images. Links of a synthetic grid (<see cref="GridLinks"/>, default 2,500 tiles), the set model
/// of its horizontal and vertical links, then <see cref="OverlapPrediction.Plan"/> (only pairs
/// whose reach meets are sampled); with <c>--exhaustive</c> also the shared area of every pair, to
/// check the same pairs come out and to time what the bound saves. Wall times on this machine:
/// compare the two in the same run.
/// </summary>
internal static class ForecastProfile
{
    public static int Run(string[] args)
    {
        int tiles = args.Length > 0 && int.TryParse(args[0], CultureInfo.InvariantCulture, out int t) ? t : 2500;
        bool exhaustive = args.Contains("--exhaustive");
        int cols = (int)Math.Ceiling(Math.Sqrt(tiles)), rows = (tiles + cols - 1) / cols;
        var (sizes, links) = GridLinks.Make(cols, rows, 0.02, 7, tiesPerLink: 200);
        var planned = links.Where(l => l.ImageB == l.ImageA + 1 || l.ImageB == l.ImageA + cols).ToList();
        var clock = Stopwatch.StartNew();
        var result = SetModelSelector.Align(sizes, new int[sizes.Length], planned, MotionModel.Homography, SetModelKind.Auto);
        double modelS = clock.Elapsed.TotalSeconds;
        clock.Restart();
        var (notExpected, toAdd) = OverlapPrediction.Plan(result, sizes, [.. planned.Select(l => (l.ImageA, l.ImageB))]);
        double planS = clock.Elapsed.TotalSeconds;
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"{sizes.Length} tiles ({cols} x {rows}), {planned.Count} planned links: set model ({result.Model}) {modelS:0.00} s; plan {planS:0.000} s: {toAdd.Count} to add, {notExpected.Count} not expected"));
        if (!exhaustive)
        {
            return 0;
        }
        clock.Restart();
        var plannedSet = planned.Select(l => (l.ImageA, l.ImageB)).ToHashSet();
        var every = new List<(int, int)>();
        for (int a = 0; a < sizes.Length; a++)
        {
            for (int b = a + 1; b < sizes.Length; b++)
            {
                if (!plannedSet.Contains((a, b)) && OverlapPrediction.Shared(result, sizes, a, b) is double f && f >= OverlapPrediction.AddAtOrAbove)
                {
                    every.Add((a, b));
                }
            }
        }
        double everyS = clock.Elapsed.TotalSeconds;
        bool same = every.SequenceEqual(toAdd.Select(p => (p.A, p.B)));
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"every pair sampled: {everyS:0.000} s, {every.Count} to add; same pairs: {(same ? "yes" : "NO")}; bound saves {everyS / Math.Max(planS, 1e-9):0.0}x"));
        return same ? 0 : 1;
    }
}
