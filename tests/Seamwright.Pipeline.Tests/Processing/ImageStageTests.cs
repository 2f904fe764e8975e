using Seamwright.Pipeline.Processing;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Processing;

public class ImageStageTests
{
    [Fact]
    public void Run_GoodAndBrokenFiles_AnalysesGoodOnesAndRecordsTheReason()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        File.WriteAllText(dir.Sub("in/s/text.png"), "this is not an image");
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var set = session.Catalog.Discover().Single();

        var images = new ImageStage(session.Context).Run(StageRun(session, set), CancellationToken.None);

        Assert.Equal(set.Files.Select(f => f.Key), images.Select(i => i.Key));
        Assert.Equal(3, images.Count(i => i.Analysis is not null && i.Decoded && i.BadReason is null));
        var bad = Assert.Single(images, i => i.BadReason is not null);
        Assert.Equal("text.png", bad.Key);
        Assert.Contains("not an image", bad.BadReason, StringComparison.Ordinal);
        Assert.All(images, i => Assert.Equal(64, i.Hash!.Length));
    }

    [Fact]
    public void Run_SecondTime_ServedFromFeatureCacheWithoutDecoding()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 2, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var set = session.Catalog.Discover().Single();
        var stage = new ImageStage(session.Context);
        var first = stage.Run(StageRun(session, set), CancellationToken.None);

        var second = stage.Run(StageRun(session, set), CancellationToken.None);

        Assert.All(first, i => Assert.True(i.Decoded));
        Assert.All(second, i => Assert.False(i.Decoded));
        Assert.Equal(first.Select(i => i.Analysis!.Size), second.Select(i => i.Analysis!.Size));
    }

    [Fact]
    public void Run_FileChangedAfterDiscovery_ThrowsInputsChanged()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 2, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var set = session.Catalog.Discover().Single();
        File.SetLastWriteTimeUtc(set.Files[1].FullPath, DateTime.UtcNow.AddMinutes(-5));

        var e = Assert.Throws<InputsChangedException>(() => ImageStage.EnsureUnchanged(set));

        Assert.Contains(set.Files[1].Key + " changed", e.Message, StringComparison.Ordinal);
    }

    private static SetRun StageRun(RootSession session, Seamwright.Pipeline.Sets.SetInputs set) =>
        new(set, 1, session.Context.PlanFor(set.Profile), false);
}
