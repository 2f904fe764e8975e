using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Features;
using Seamwright.Core.Geometry;
using Seamwright.Core.Matching;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Demo;
using EstimationSettings = Seamwright.Pipeline.Settings.EstimationSettings;
using LimitSettings = Seamwright.Pipeline.Settings.LimitSettings;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// <c>sweep-links [tiles] [--cache DIR]</c>: how good each link of the <c>scale --sweep</c> benchmark's
/// 100-tile sweep is against the generator's truth. Analyses the first <c>tiles</c> tiles (default
/// 12) with the real engine, estimates every neighbour pair, and scores the engine's tie points:
/// per coordinate error against the truth, its mean per link (bias), its dependence on the
/// sub-pixel phase of the interpolated coordinate, and a least-squares similarity fitted to them
/// against the truth (rotation and log scale error, RMS over links, next to what independent
/// tie-point noise of the measured size would give). Then the same matches are re-localised through
/// the first estimate (as the engine does), the engine's final estimate and the truth: a
/// re-localisation whose result follows the transform it starts from gives different figures.
/// </summary>
internal static class SweepLinks
{
    public static int Run(string[] args)
    {
        int tiles = args.Length > 0 && int.TryParse(args[0], CultureInfo.InvariantCulture, out int t) ? t : 12;
        string cache = Path.Combine(Path.GetTempPath(), "seamwright-scale");
        for (int i = 1; i < args.Length; i++)
        {
            if (args[i] == "--cache")
            {
                cache = args[++i];
            }
        }
        const int n = 100;
        string root = ScaleGrid.Ensure(n, 11, cache, sweep: true);
        string grid = Path.Combine(root, "input", "grid");
        var truth = DemoTruth.Read(Path.Combine(root, DemoTruth.FileName));
        var engine = new FeaturesEngine();
        var featureSettings = new Seamwright.Pipeline.Settings.FeatureSettings();
        var budget = new MemoryBudget(1L << 30);
        var analyses = new ImageAnalysis[tiles];
        Parallel.For(0, tiles, k => analyses[k] = engine.Analyze(Path.Combine(grid, ScaleGrid.Name(0, k)), featureSettings, new LimitSettings(), budget, CancellationToken.None));
        var estimation = new EstimationSettings();
        var stats = new LinkStats();
        var relocatedStats = new LinkStats();
        string[] models = ["first estimate", "final estimate", "truth"];
        var modelStats = models.Select(_ => new LinkStats()).ToArray();
        for (int k = 0; k + 1 < tiles; k++)
        {
            string na = ScaleGrid.Name(0, k), nb = ScaleGrid.Name(0, k + 1);
            ulong seed = PairSeed.Derive(estimation.Seed, na, nb);
            var pa = engine.EstimatePair(analyses[k], analyses[k + 1], estimation, seed);
            var aToB = truth.ToReference[nb].Inverse() * truth.ToReference[na];
            stats.Add([.. pa.TiePoints], aToB);
            static bool Integer(double v) => Math.Abs(v - Math.Round(v)) < 1e-9;
            relocatedStats.Add([.. pa.TiePoints.Where(c => (Integer(c.X1) && Integer(c.Y1)) || (Integer(c.X2) && Integer(c.Y2)))], aToB);
            var fa = (ImageFeatures)analyses[k].Payload;
            var fb = (ImageFeatures)analyses[k + 1].Payload;
            // The engine's matches re-localised through three transforms: the first estimate from the working-resolution
            // corners after guided matching (what the engine uses), the engine's final estimate, and the truth.
            var options0 = EstimationOptions.Default with { Threshold = 3, Seed = seed };
            var raw = HammingMatcher.Match(fa.Descriptors, fb.Descriptors, fa.Keypoints, fb.Keypoints, new MatchOptions { MaxRatio = estimation.RatioTest });
            var first = PairEstimator.Estimate(Points(fa, fb, raw.Matches), fa.FullSize, fb.FullSize, options0);
            var again = GuidedMatcher.Match(fa.Descriptors, fb.Descriptors, fa.Keypoints, fb.Keypoints, first.Transform!.Value, new GuidedMatchOptions { Radius = 6 });
            var second = PairEstimator.Repolish(Points(fa, fb, again), first, fa.FullSize, fb.FullSize, options0);
            var start = second.Consensus.Final > first.Consensus.Final ? second : first;
            Transform2D[] transforms = [start.Transform!.Value, pa.Estimate.Transform!.Value, aToB];
            var matches = second.Consensus.Final > first.Consensus.Final ? again : raw.Matches;
            var options = new RelocalizeOptions { TemplateRadius = 8, MaxShift = 4 };
            for (int v = 0; v < models.Length; v++)
            {
                var ties = new List<Correspondence>();
                foreach (var m in matches)
                {
                    if (TiePointRelocalizer.TryRelocalize(fa.Patch(m.IndexA), fb.Patch(m.IndexB), transforms[v], options, out var c, out _))
                    {
                        ties.Add(c);
                    }
                }
                modelStats[v].Add(DistinctTies.Distinct(ties.ToArray(), 1.0), aToB);
            }
        }
        Console.WriteLine("engine tie points:");
        stats.Print(Console.Out);
        Console.WriteLine("engine tie points, re-localised only:");
        relocatedStats.Print(Console.Out);
        for (int v = 0; v < models.Length; v++)
        {
            Console.WriteLine($"matches re-localised through the {models[v]}:");
            modelStats[v].Print(Console.Out);
        }
        return 0;
    }

    private static Correspondence[] Points(ImageFeatures a, ImageFeatures b, IEnumerable<FeatureMatch> matches) =>
        [.. matches.Select(m => new Correspondence(a.Keypoints[m.IndexA].X, a.Keypoints[m.IndexA].Y, b.Keypoints[m.IndexB].X, b.Keypoints[m.IndexB].Y))];

    /// <summary>Accumulates the link figures.</summary>
    private sealed class LinkStats
    {
        private readonly List<double> rotation = [], logScale = [], predicted = [], biasX = [], biasY = [], counts = [];
        private readonly double[] phaseSum = new double[10];
        private readonly int[] phaseCount = new int[10];
        private double errorSum2;
        private long errorCount;

        public void Add(Correspondence[] ties, Transform2D aToB)
        {
            var errs = new List<(double Ex, double Ey, double Phase, double X, double Y)>();
            foreach (var c in ties)
            {
                bool anchorA = Math.Abs(c.X1 - Math.Round(c.X1)) < 1e-9 && Math.Abs(c.Y1 - Math.Round(c.Y1)) < 1e-9;
                if (anchorA)
                {
                    var (u, v) = aToB.Apply(c.X1, c.Y1);
                    errs.Add((c.X2 - u, c.Y2 - v, c.X2 - Math.Floor(c.X2), c.X1, c.Y1));
                }
                else
                {
                    var (u, v) = aToB.Inverse().Apply(c.X2, c.Y2);
                    errs.Add((c.X1 - u, c.Y1 - v, c.X1 - Math.Floor(c.X1), c.X1, c.Y1));
                }
            }
            // Trim gross errors (slipped points) before the figures: 1 px.
            var kept = errs.Where(e => e.Ex * e.Ex + e.Ey * e.Ey < 1).ToList();
            foreach (var e in kept)
            {
                errorSum2 += e.Ex * e.Ex + e.Ey * e.Ey;
                errorCount += 2;
                int bin = Math.Min(9, (int)(e.Phase * 10));
                phaseSum[bin] += e.Ex;
                phaseCount[bin]++;
            }
            biasX.Add(kept.Average(e => e.Ex));
            biasY.Add(kept.Average(e => e.Ey));
            counts.Add(kept.Count);
            // Rotation and log scale of a similarity fitted to the errors (small-motion linearisation about the centroid).
            double cx = kept.Average(e => e.X), cy = kept.Average(e => e.Y);
            double sxx = 0, rot = 0, sc = 0, sigma2 = 0;
            foreach (var e in kept)
            {
                double dx = e.X - cx, dy = e.Y - cy;
                sxx += dx * dx + dy * dy;
            }
            double mx = kept.Average(e => e.Ex), my = kept.Average(e => e.Ey);
            foreach (var e in kept)
            {
                double dx = e.X - cx, dy = e.Y - cy;
                rot += dx * (e.Ey - my) - dy * (e.Ex - mx);
                sc += dx * (e.Ex - mx) + dy * (e.Ey - my);
            }
            rot /= sxx;
            sc /= sxx;
            foreach (var e in kept)
            {
                double dx = e.X - cx, dy = e.Y - cy;
                double rx = e.Ex - mx - (sc * dx - rot * dy), ry = e.Ey - my - (sc * dy + rot * dx);
                sigma2 += rx * rx + ry * ry;
            }
            sigma2 /= 2 * kept.Count - 4;
            rotation.Add(rot);
            logScale.Add(sc);
            predicted.Add(Math.Sqrt(sigma2 / sxx));
        }

        public void Print(TextWriter o)
        {
            static double Rms(List<double> l) => Math.Sqrt(l.Average(v => v * v));
            o.WriteLine(FormattableString.Invariant($"{rotation.Count} links, median {counts.Order().ElementAt(counts.Count / 2):0} tie points; tie error per coordinate {Math.Sqrt(errorSum2 / errorCount):0.0000} px"));
            o.WriteLine(FormattableString.Invariant($"link rotation error RMS {Rms(rotation) * 1e5:0.00}e-5, log scale {Rms(logScale) * 1e5:0.00}e-5; independent-noise prediction {Rms(predicted) * 1e5:0.00}e-5 (ratio {Rms(rotation) / Rms(predicted):0.00} / {Rms(logScale) / Rms(predicted):0.00})"));
            o.WriteLine(FormattableString.Invariant($"link mean error (bias) RMS x {Rms(biasX):0.0000} y {Rms(biasY):0.0000} px; mean x {biasX.Average():0.0000} y {biasY.Average():0.0000}"));
            o.WriteLine("x error by sub-pixel phase of the interpolated coordinate (tenths): "
                + string.Join(" ", Enumerable.Range(0, 10).Select(b => (phaseSum[b] / Math.Max(1, phaseCount[b])).ToString("+0.0000;-0.0000", CultureInfo.InvariantCulture))));
        }
    }
}
