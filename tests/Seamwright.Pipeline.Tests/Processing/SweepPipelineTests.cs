using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Processing;

/// <summary>
/// A long flat sweep through the real pipeline (features engine, sequence pairing, overlap-aware
/// planning, automatic set model): 30 frames of 320 x 240 in one row at a 224 px pitch (30 %
/// overlap), each with a small invented turn, scale and shift (a similarity truth), rendered by
/// the project's renderer. Frames two apart are 448 px apart and cannot overlap: the sequence plan
/// lists those 28 pairs, but the alignment of the 29 neighbour pairs rules them out, so they are
/// recorded as not expected to overlap without being estimated, and nothing counts as rejected.
/// </summary>
public sealed class SweepPipelineTests(ITestOutputHelper output)
{
    private const int Frames = 30, W = 320, H = 240;

    [Fact]
    public void Process_FlatSweep_NeighboursOnlyEstimatedSimilarityChosenNoDrift()
    {
        using var dir = new ScratchFolder();
        var views = WriteSweep(dir.Sub("in/sweep"));
        var options = new SeamwrightOptions();
        options.Profiles["default"] = new ProfileSettings();
        var engine = new CountingEngine(new FeaturesEngine());
        using var session = RootSession.Open(options.RootFor(dir.Sub("in"), dir.Sub("out")), options, engine, new MemoryBudget(256L << 20),
            new SemaphoreSlim(2), NullObserver.Instance);

        var outcome = new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);

        Assert.True(outcome.Kind == SetOutcomeKind.Done, outcome.Reason);
        var summary = outcome.Summary!;
        output.WriteLine($"pairs {summary.Pairs} (accepted {summary.Accepted}, weak {summary.Weak}, rejected {summary.Rejected}), estimated {engine.Estimates}");
        Assert.Equal(Frames - 1 + Frames - 2, summary.Pairs); // the sequence plan, span 2
        Assert.Equal(Frames - 1, engine.Estimates); // neighbours only
        Assert.Equal(Frames - 1, summary.Accepted);
        Assert.Equal(0, summary.Rejected); // what `run` reads for its exit code

        string set = dir.Sub("out/sweep");
        var manifest = OutputJson.ReadManifest(Path.Combine(set, OutputLayout.ManifestName));
        Assert.Equal("similarity", manifest.Alignment?.SetModel?.Model);
        var sidecars = Enumerable.Range(0, Frames).Select(k => OutputJson.ReadSidecar(Path.Combine(set, Name(k) + ".seam.json"))).ToArray();
        var skipped = sidecars[0].Links.Single(l => l.Other == Name(2));
        Assert.Equal("rejected", skipped.Status);
        Assert.StartsWith(OverlapPlanning.NotExpectedPrefix, skipped.Reasons[0], StringComparison.Ordinal);
        Assert.EndsWith("not estimated", skipped.Reasons[0], StringComparison.Ordinal);

        string reference = sidecars.Select(s => s.Reference).Distinct().Single()!;
        int r = Array.IndexOf(Enumerable.Range(0, Frames).Select(Name).ToArray(), reference);
        var errors = new List<double>();
        for (int k = 0; k < Frames; k++)
        {
            var ours = Transform2D.FromRows(sidecars[k].ToReference ?? throw new InvalidOperationException(Name(k) + " unplaced"));
            var truth = SceneView.Between(views[k], views[r]);
            foreach (var (x, y) in Transform2D.Corners(W, H))
            {
                var (u, v) = ours.Apply(x, y);
                var (tu, tv) = truth.Apply(x, y);
                errors.Add(Math.Sqrt((u - tu) * (u - tu) + (v - tv) * (v - tv)));
            }
        }
        errors.Sort();
        double median = errors[errors.Count / 2], worst = errors[^1];
        output.WriteLine($"reference {reference}; corner error vs truth median {median:0.000} px, worst {worst:0.000} px");
        // Issue 10's sweep targets (measured 2026-12-03: 0.583 / 2.270 px; a chain of homographies drifts by tens of pixels).
        Assert.True(median <= 1, $"median corner error {median} px");
        Assert.True(worst <= 5, $"worst corner error {worst} px");
    }

    private static string Name(int k) => $"sweep_{k + 1:000}.png";

    /// <summary>The frames, rendered with 2 x 2 samples per pixel and sensor noise; returns each frame's view (the truth).</summary>
    private static SceneView[] WriteSweep(string folder)
    {
        Directory.CreateDirectory(folder);
        var scene = new ProceduralScene(9191, SceneStyle.EstateMap);
        var jitter = new SplitMix(77);
        var views = new SceneView[Frames];
        for (int k = 0; k < Frames; k++)
        {
            double angle = 0.01 * jitter.Signed(), scale = 1 + 0.008 * jitter.Signed();
            var local = ViewTransforms.SimilarityAbout(W / 2.0, H / 2.0, scale, angle);
            views[k] = new SceneView(W, H, Transform2D.Translation(224.0 * k + 6 * jitter.Signed() + 200, 6 * jitter.Signed() + 200) * local);
        }
        Parallel.For(0, Frames, new ParallelOptions { MaxDegreeOfParallelism = 2 }, k =>
        {
            var pixels = ImageEffects.AddGaussianNoise(SceneRenderer.Render(scene, views[k], samplesPerAxis: 2), 1.5, (ulong)(1000 + k));
            ImageWriter.WritePng(Path.Combine(folder, Name(k)), pixels);
        });
        return views;
    }

    /// <summary>Seeded uniform numbers in [-1, 1) (splitmix64), never System.Random.</summary>
    private sealed class SplitMix(ulong seed)
    {
        private ulong _state = seed;

        public double Signed()
        {
            ulong z = _state += 0x9E3779B97F4A7C15UL;
            z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
            z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
            z ^= z >> 31;
            return 2.0 * (z >> 11) / (1UL << 53) - 1;
        }
    }

    /// <summary>The real engine, counting the pairs it estimates.</summary>
    private sealed class CountingEngine(IPairEngine inner) : IPairEngine
    {
        private int _estimates;

        public int Estimates => Volatile.Read(ref _estimates);

        public string Name => inner.Name;

        public string DescriptorVersion => inner.DescriptorVersion;

        public int AlgorithmVersion => inner.AlgorithmVersion;

        public ImageAnalysis Analyze(string path, FeatureSettings features, LimitSettings limits, MemoryBudget budget, CancellationToken cancel) =>
            inner.Analyze(path, features, limits, budget, cancel);

        public byte[] Encode(ImageAnalysis analysis) => inner.Encode(analysis);

        public ImageAnalysis Decode(ReadOnlySpan<byte> data) => inner.Decode(data);

        public PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, EstimationSettings settings, ulong seed)
        {
            Interlocked.Increment(ref _estimates);
            return inner.EstimatePair(a, b, settings, seed);
        }
    }
}
