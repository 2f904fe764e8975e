using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Processing;

/// <summary>The pairs stage on a few small images analysed by the image stage (checksum engine).</summary>
public class PairStageTests
{
    [Fact]
    public void Run_FiveGoodOneBad_PlansOverGoodImagesAndSeedsEachPairFromItsNames()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 5, 1);
        File.WriteAllText(dir.Sub("in/s/img003b.png"), "not an image");
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var (run, images) = Analysed(session, new ProfileSettings());

        var result = new PairStage(session.Context).Run(run, images, CancellationToken.None);

        Assert.Equal(new[] { "img001.png", "img002.png", "img003.png", "img004.png", "img005.png" }, result.Images.Select(i => i.Key));
        Assert.Equal(7, result.Pairs.Count); // sequence, span 2: 4 + 3
        Assert.All(result.Pairs, p => Assert.Equal(PairSeed.Derive(run.Profile.Estimation.Seed, result.KeyA(p), result.KeyB(p)), p.Estimate.Seed));
        Assert.Equal(result.Plan.Pairs.Select(p => (p.A, p.B)), result.Pairs.Select(p => (p.A, p.B)));
    }

    [Fact]
    public void Run_FramesSetWithReview_DeviatingAcceptedPairBecomesWeakWithTheReason()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        session.Context.Review = new RefuseWith("img002.png", "baseline moved");
        var (run, images) = Analysed(session, new ProfileSettings { Pairing = new PairingSettings { Mode = PairingMode.Frames } });

        var result = new PairStage(session.Context).Run(run, images, CancellationToken.None);

        Assert.Equal(3, result.Pairs.Count); // every camera pair
        var weak = Assert.Single(result.Pairs, p => p.Estimate.Status == PairStatus.Weak);
        Assert.Equal(("img001.png", "img002.png"), (result.KeyA(weak), result.KeyB(weak)));
        Assert.Equal("baseline moved", weak.Estimate.Reasons[^1]);
    }

    [Fact]
    public void Run_UndecidedPairs_SecondLookForThemOnlyAndEachPairReportedOnceWithItsFinalStatus()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 4, 1);
        var engine = new TwoPassEngine(undecided: ("img001.png", "img003.png"));
        var observer = new PairCounter();
        using var session = RootSession.Open(Sessions.Options().RootFor(dir.Sub("in"), dir.Sub("out")), Sessions.Options(), engine,
            new MemoryBudget(256L << 20), new SemaphoreSlim(2), observer);
        var (run, images) = Analysed(session, new ProfileSettings());

        var result = new PairStage(session.Context).Run(run, images, CancellationToken.None);

        Assert.Equal(5, result.Pairs.Count); // sequence, span 2: 3 + 2
        Assert.Equal(5, engine.CornerPasses);
        Assert.Equal(1, engine.SecondLooks); // only the undecided pair
        var looked = Assert.Single(result.Pairs, p => p.Estimate.FeaturePath == FeaturePath.ScaleSpace);
        Assert.Equal(("img001.png", "img003.png"), (result.KeyA(looked), result.KeyB(looked)));
        Assert.Equal(PairStatus.Accepted, looked.Estimate.Status);
        Assert.Equal(5, observer.Done.Count);
        Assert.Equal(5, observer.Done.Select(d => (d.A, d.B)).Distinct().Count());
        Assert.Contains(observer.Done, d => d.A == "img001.png" && d.B == "img003.png" && d.Status == PairStatus.Accepted);
        Assert.Equal((1, 1), (observer.SecondLookCalls, observer.DecidedByScaleSpace));
    }

    [Fact]
    public void Run_SecondLookTurnedOff_CornerResultsStand()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 4, 1);
        var engine = new TwoPassEngine(undecided: ("img001.png", "img003.png"));
        using var session = RootSession.Open(Sessions.Options().RootFor(dir.Sub("in"), dir.Sub("out")), Sessions.Options(), engine,
            new MemoryBudget(256L << 20), new SemaphoreSlim(2), NullObserver.Instance);
        var (run, images) = Analysed(session, new ProfileSettings { Estimation = new EstimationSettings { ScaleSpaceLook = false } });

        var result = new PairStage(session.Context).Run(run, images, CancellationToken.None);

        Assert.Equal(0, engine.SecondLooks);
        Assert.Single(result.Pairs, p => p.Estimate.Status == PairStatus.Rejected);
    }

    /// <summary>
    /// The checksum engine with 40 inliers per pair, except one pair that the corner pass rejects
    /// and the second look accepts from scale-space features; counts both passes.
    /// </summary>
    private sealed class TwoPassEngine((string A, string B) undecided) : IPairEngine
    {
        private readonly ChecksumEngine _inner = new();
        private int _corners, _second;

        public int CornerPasses => _corners;

        public int SecondLooks => _second;

        public string Name => _inner.Name;

        public string DescriptorVersion => _inner.DescriptorVersion;

        public int AlgorithmVersion => _inner.AlgorithmVersion;

        public bool HasSecondLook => true;

        public ImageAnalysis Analyze(string path, FeatureSettings features, LimitSettings limits, MemoryBudget budget, CancellationToken cancel) =>
            _inner.Analyze(path, features, limits, budget, cancel);

        public byte[] Encode(ImageAnalysis analysis) => _inner.Encode(analysis);

        public ImageAnalysis Decode(ReadOnlySpan<byte> data) => _inner.Decode(data);

        public PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, EstimationSettings settings, ulong seed)
        {
            Interlocked.Increment(ref settings.ScaleSpaceLook ? ref _second : ref _corners);
            var pa = _inner.EstimatePair(a, b, settings, seed);
            var e = pa.Estimate with { Consensus = new ConsensusFigures(40, 40, 40, 0) };
            // The checksum payload is the image width; the set's images differ in seed only, so the pair is told by its seed.
            bool isUndecided = seed == PairSeed.Derive(settings.Seed, undecided.A, undecided.B);
            if (isUndecided)
            {
                e = settings.ScaleSpaceLook
                    ? e with { FeaturePath = FeaturePath.ScaleSpace }
                    : e with { Status = PairStatus.Rejected, Transform = null, Reasons = ["too few inliers (made up)"] };
            }
            return pa with { Estimate = e };
        }
    }

    private sealed class PairCounter : IProcessingObserver
    {
        public System.Collections.Concurrent.ConcurrentQueue<(string A, string B, PairStatus Status)> Done { get; } = new();

        public int SecondLookCalls { get; private set; }

        public int DecidedByScaleSpace { get; private set; }

        public void SetStarted(string setId, long runId, int images) { }

        public void ImageDone(string setId, string image, bool fromCache) { }

        public void BadFile(string setId, string image, string reason) { }

        public void PairsPlanned(string setId, int pairs) { }

        public void PairDone(string setId, string imageA, string imageB, PairStatus status, IReadOnlyList<string> reasons) =>
            Done.Enqueue((imageA, imageB, status));

        public void SecondLooks(string setId, int estimated, int reused, int decidedByScaleSpace)
        {
            SecondLookCalls++;
            DecidedByScaleSpace += decidedByScaleSpace;
        }

        public void SetFinished(SetOutcome outcome) { }
    }

    private static (SetRun Run, AnalysedImage[] Images) Analysed(RootSession session, ProfileSettings profile)
    {
        var set = session.Catalog.Discover().Single();
        var run = new SetRun(set, 1, StageInputs.Plan(profile), false);
        return (run, new ImageStage(session.Context).Run(run, CancellationToken.None));
    }

    private sealed class RefuseWith(string imageB, string reason) : IPairReview
    {
        public string? ReviewAccepted(string profileName, ProfileSettings profile, string setId, string imageA, string imageB2, Transform2D aToB, ImageSize sizeA) =>
            imageB2 == imageB ? reason : null;
    }
}
