using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Matching;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;
using EstimationSettings = Seamwright.Pipeline.Settings.EstimationSettings;
using LimitSettings = Seamwright.Pipeline.Settings.LimitSettings;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// <c>profile-pairs [tiles] [--cache DIR] [--dump FILE]</c>: where one grid pair's time goes. Takes the
/// <c>scale</c> benchmark's 400-tile grid (rendered when missing), analyses the first
/// <c>tiles</c> tiles (default 40) with the real engine and runs every right and lower
/// neighbour pair through <see cref="PairProcessor"/> on one thread, printing the thread CPU time
/// of the whole pair next to the stage timings the pair reports (matching, sampling,
/// refinement, polish with runner-up) and the parts timed here on their own on the thread CPU clock
/// (matching, the first estimate, guided matching with its polish, re-localisation, the final re-polish), plus feature, match, LP and inlier counts,
/// and a hash of every pair's transform and tie points (the same hash means the same results).
/// </summary>
internal static class PairProfile
{
    public static int Run(string[] args)
    {
        int tiles = args.Length > 0 && int.TryParse(args[0], CultureInfo.InvariantCulture, out int t) ? t : 40;
        string cache = Path.Combine(Path.GetTempPath(), "seamwright-scale");
        string? dump = null;
        for (int i = 1; i < args.Length; i++)
        {
            if (args[i] == "--cache")
            {
                cache = args[++i];
            }
            else if (args[i] == "--dump")
            {
                dump = args[++i];
            }
        }
        const int n = 400;
        string grid = Path.Combine(ScaleGrid.Ensure(n, 11, cache), "input", "grid");
        int cols = ScaleGrid.Columns(n);
        var engine = new FeaturesEngine();
        var featureSettings = new Seamwright.Pipeline.Settings.FeatureSettings();
        var budget = new MemoryBudget(1L << 30);
        var limits = new LimitSettings();
        var analyses = new Dictionary<int, ImageAnalysis>();
        double featureCpu = 0;
        for (int k = 0; k < tiles; k++)
        {
            double c0 = ThreadCpuClock.NowMilliseconds();
            analyses[k] = engine.Analyze(Path.Combine(grid, ScaleGrid.Name(k / cols, k % cols)), featureSettings, limits, budget, CancellationToken.None);
            featureCpu += ThreadCpuClock.NowMilliseconds() - c0;
        }
        var pairs = new List<(int A, int B)>();
        for (int k = 0; k < tiles; k++)
        {
            if (k % cols + 1 < cols && k + 1 < tiles)
            {
                pairs.Add((k, k + 1));
            }
            if (k + cols < tiles)
            {
                pairs.Add((k, k + cols));
            }
        }
        var estimation = new EstimationSettings();
        var rows = new List<double[]>();
        var mapped = new List<string>();
        ulong hash = 14695981039346656037UL;
        foreach (var (a, b) in pairs)
        {
            var fa = (ImageFeatures)analyses[a].Payload;
            var fb = (ImageFeatures)analyses[b].Payload;
            ulong seed = PairSeed.Derive(estimation.Seed, ScaleGrid.Name(a / cols, a % cols), ScaleGrid.Name(b / cols, b % cols));
            double c0 = ThreadCpuClock.NowMilliseconds();
            var pa = engine.EstimatePair(analyses[a], analyses[b], estimation, seed);
            double total = ThreadCpuClock.NowMilliseconds() - c0;
            var parts = Parts(fa, fb, estimation, seed);
            var e = pa.Estimate;
            hash = Mix(hash, e, pa.TiePoints);
            mapped.Add(Corners(a, b, e, fa.FullSize));
            rows.Add([total, parts.Matching, parts.First, parts.Guided, parts.Relocalize, parts.Final, e.TimingsMs.Sampling, e.TimingsMs.Refinement, e.TimingsMs.Polish,
                fa.Count, parts.Matches, e.LpCount, e.Consensus.Final, pa.TiePoints.Count]);
        }
        Console.WriteLine(FormattableString.Invariant($"{tiles} tiles, features {featureCpu / tiles:0.0} ms CPU per tile; {pairs.Count} pairs (one thread)"));
        string[] names = ["pair CPU ms", "  matching", "  first estimate", "  guided matching + polish", "  re-localisation", "  distinct + re-polish",
            "  sampling (first, wall)", "  refinement (first, wall)", "  polish + runner-up + re-polish (wall)", "features A", "matches", "LPs", "final inliers", "tie points"];
        for (int c = 0; c < names.Length; c++)
        {
            var col = rows.Select(r => r[c]).Order().ToArray();
            Console.WriteLine(FormattableString.Invariant($"{names[c],-34} median {col[col.Length / 2],9:0.00}  mean {col.Average(),9:0.00}  max {col[^1],9:0.00}"));
        }
        foreach (var (name, values) in Sub)
        {
            var col = values.Order().ToArray();
            Console.WriteLine(FormattableString.Invariant($"{"  first estimate: " + name,-34} median {col[col.Length / 2],9:0.00}  mean {col.Average(),9:0.00}  max {col[^1],9:0.00}  (CPU)"));
        }
        Console.WriteLine(FormattableString.Invariant($"results hash {hash:X16}"));
        if (dump is not null)
        {
            File.WriteAllLines(dump, mapped);
            Console.WriteLine($"pair status, inliers and mapped corners of A written to {dump}");
        }
        return 0;
    }

    private readonly record struct PartTimes(double Matching, double First, double Guided, double Relocalize, double Final, int Matches);

    /// <summary>
    /// The pair's corner path again, each step on the thread CPU clock (the same calls as
    /// <see cref="PairProcessor"/>: matching, first estimate, guided matching with its polish,
    /// re-localisation, repeats dropped and the final re-polish); the first estimate's own stages
    /// are then timed once more on their own (<see cref="SubStages"/>), outside these figures.
    /// </summary>
    private static PartTimes Parts(ImageFeatures a, ImageFeatures b, EstimationSettings s, ulong seed)
    {
        var options = EstimationOptions.Default with
        {
            Model = s.MotionModel, Threshold = s.ThresholdPx, Seed = seed, Refine = s.RefineConsensus,
            Confidence = s.Confidence, MaxIterations = s.MaxIterations,
        };
        var settings = new PairSettings { Estimation = options, Matching = new MatchOptions { MaxRatio = s.RatioTest } };
        double c0 = ThreadCpuClock.NowMilliseconds();
        var result = HammingMatcher.Match(a.Descriptors, b.Descriptors, a.Keypoints, b.Keypoints, settings.Matching);
        double c1 = ThreadCpuClock.NowMilliseconds();
        var pairs = result.Matches;
        var points = pairs.Select(m => new Correspondence(a.Keypoints[m.IndexA].X, a.Keypoints[m.IndexA].Y, b.Keypoints[m.IndexB].X, b.Keypoints[m.IndexB].Y)).ToArray();
        double coarse = Math.Max(options.Threshold, 1.5 * Math.Max(a.WorkingScale, b.WorkingScale));
        var first = PairEstimator.Estimate(points, a.FullSize, b.FullSize, options with { Threshold = coarse });
        double c2 = ThreadCpuClock.NowMilliseconds();
        var estimate = first;
        if (settings.Guided is { } guided && first.Status == PairStatus.Accepted)
        {
            (pairs, points, estimate) = PairProcessor.Guide(a, b, pairs, points, first, guided, options with { Threshold = coarse }, 2 * coarse);
        }
        double c3 = ThreadCpuClock.NowMilliseconds(), c4 = c3, c5 = c3;
        if (estimate.Transform is { } model)
        {
            var ties = (Correspondence[])points.Clone();
            PairProcessor.Relocalize(a, b, pairs, ties, model, coarse, settings);
            c4 = ThreadCpuClock.NowMilliseconds();
            ties = DistinctTies.Distinct(ties, Math.Max(1.0, Math.Max(a.WorkingScale, b.WorkingScale)));
            PairEstimator.Repolish(ties, estimate, a.FullSize, b.FullSize, options);
            c5 = ThreadCpuClock.NowMilliseconds();
        }
        SubStages(result.Matches.Select(m => new Correspondence(a.Keypoints[m.IndexA].X, a.Keypoints[m.IndexA].Y, b.Keypoints[m.IndexB].X, b.Keypoints[m.IndexB].Y)).ToArray(),
            a, options with { Threshold = coarse });
        return new PartTimes(c1 - c0, c2 - c1, c3 - c2, c4 - c3, c5 - c4, result.Matches.Length);
    }

    private static readonly Dictionary<string, List<double>> Sub = [];

    /// <summary>The first estimate's stages again, each on its own thread CPU clock (sampling, refinement, polish, runner-up).</summary>
    private static void SubStages(Correspondence[] points, ImageFeatures a, EstimationOptions o)
    {
        void Add(string name, double ms) => (Sub.TryGetValue(name, out var l) ? l : Sub[name] = []).Add(ms);
        double c0 = ThreadCpuClock.NowMilliseconds();
        var sampled = PairEstimator.Sample(points, o);
        double c1 = ThreadCpuClock.NowMilliseconds();
        Add("sampling", c1 - c0);
        if (sampled.Model is not { } model)
        {
            return;
        }
        var refined = ConsensusRefiner.Refine(points, model, o.Model, o.Threshold, o.Refiner);
        double c2 = ThreadCpuClock.NowMilliseconds();
        Add("refinement", c2 - c1);
        var polish = PairEstimator.Polish(points, refined.Transform, a.FullSize, o);
        double c3 = ThreadCpuClock.NowMilliseconds();
        Add("polish", c3 - c2);
        PairEstimator.RunnerUpConsensus(points, polish.Transform, polish.InlierIndices, a.FullSize, o);
        Add("runner-up", ThreadCpuClock.NowMilliseconds() - c3);
    }

    /// <summary>One line per pair: indices, status, final inliers and where the transform puts A's four corners (for comparing two builds).</summary>
    private static string Corners(int a, int b, PairEstimate e, ImageSize size)
    {
        var line = new System.Text.StringBuilder(FormattableString.Invariant($"{a} {b} {e.Status} {e.Consensus.Final}"));
        if (e.Transform is { } h)
        {
            foreach (var (x, y) in Transform2D.Corners(size.Width, size.Height))
            {
                var (u, v) = h.Apply(x, y);
                line.Append(FormattableString.Invariant($" {u:R} {v:R}"));
            }
        }
        return line.ToString();
    }

    private static ulong Mix(ulong hash, PairEstimate e, IReadOnlyList<Correspondence> ties)
    {
        void Add(double v) => hash = (hash ^ (ulong)BitConverter.DoubleToInt64Bits(v)) * 1099511628211UL;
        if (e.Transform is { } h)
        {
            foreach (double v in h.ToRowMajor())
            {
                Add(v);
            }
        }
        Add((double)e.Status);
        foreach (var c in ties)
        {
            Add(c.X1);
            Add(c.Y1);
            Add(c.X2);
            Add(c.Y2);
        }
        return hash;
    }
}
