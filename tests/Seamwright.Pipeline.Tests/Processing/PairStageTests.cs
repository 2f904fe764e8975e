using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
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
