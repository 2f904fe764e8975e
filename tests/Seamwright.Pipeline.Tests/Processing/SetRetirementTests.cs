using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Processing;

public class SetRetirementTests
{
    [Fact]
    public void Retire_ProcessedSet_RemovesOnlyListedFilesThenManifestThenEmptiedFoldersLedgerSaysRetired()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/maps/kept"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/maps/gone"), 3, 10);
        TestImages.WriteSet(dir.Sub("in/noted"), 3, 20);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var processor = new SetProcessor(session.Context);
        foreach (var set in session.Catalog.Discover())
        {
            Assert.Equal(SetOutcomeKind.Done, processor.Process(set, false, CancellationToken.None).Kind);
        }
        File.WriteAllText(dir.Sub("out/noted/operator-notes.txt"), "not ours");
        Directory.Delete(dir.Sub("in/maps/gone"), recursive: true);
        Directory.Delete(dir.Sub("in/noted"), recursive: true);
        var inputs = TestImages.Hashes(dir.Sub("in"));
        int listed = OutputJson.ReadManifest(dir.Sub("out/maps/gone/" + OutputLayout.ManifestName)).Files.Count();

        var retired = SetRetirement.RetireMissing(session.Context, session.Catalog.Discover().Select(s => s.SetId));

        Assert.Equal(["maps/gone", "noted"], retired);
        Assert.False(Directory.Exists(dir.Sub("out/maps/gone")), "the emptied set output folder is removed");
        Assert.True(Directory.Exists(dir.Sub("out/maps")), "only the set's own folder is removed");
        Assert.Equal(["operator-notes.txt"], Directory.GetFileSystemEntries(dir.Sub("out/noted")).Select(Path.GetFileName));
        Assert.True(File.Exists(dir.Sub("out/maps/kept/" + OutputLayout.ManifestName)));
        Assert.Equal(inputs, TestImages.Hashes(dir.Sub("in")));
        var rec = session.Context.Store.GetSet("maps/gone")!;
        Assert.Equal((SetStates.Retired, SetRetirement.Reason), (rec.State, rec.Reason));
        Assert.All(session.Context.Store.Files("maps/gone"), f => Assert.Equal("removed", f.State));
        Assert.Equal(SetStates.Done, session.Context.Store.GetSet("maps/kept")!.State);
        Assert.True(listed > 3);
        Assert.Empty(SetRetirement.RetireMissing(session.Context, ["maps/kept"])); // retired sets are not retired again
    }

    [Fact]
    public void Retire_SetComesBack_NotUpToDateSoProcessedAgainWithFullOutputs()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var set = session.Catalog.Discover().Single();
        new SetProcessor(session.Context).Process(set, false, CancellationToken.None);
        SetRetirement.Retire(session.Context, "s");

        var again = session.Catalog.Discover().Single();

        Assert.False(session.Context.IsUpToDate(again));
        Assert.Equal(SetOutcomeKind.Done, new SetProcessor(session.Context).Process(again, false, CancellationToken.None).Kind);
        Assert.Equal(SetStates.Done, session.Context.Store.GetSet("s")!.State);
        Assert.True(File.Exists(dir.Sub("out/s/" + OutputLayout.ManifestName)));
    }

    [Fact]
    public void Retire_ManifestListingPathsOutsideItsFolder_ThoseAreNeverTouched()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        string manifestPath = dir.Sub("out/s/" + OutputLayout.ManifestName);
        var m = OutputJson.ReadManifest(manifestPath);
        var hostile = m with { Files = [.. m.Files, new ManifestEntry("../../in/s/img001.png", "sidecar", "00"), new ManifestEntry("../confidence.jsonl", "sidecar", "00")] };
        File.WriteAllBytes(manifestPath, OutputJson.Manifest(hostile));
        var inputs = TestImages.Hashes(dir.Sub("in"));

        SetRetirement.Retire(session.Context, "s");

        Assert.Equal(inputs, TestImages.Hashes(dir.Sub("in")));
        Assert.True(File.Exists(dir.Sub("out/confidence.jsonl")));
        Assert.False(Directory.Exists(dir.Sub("out/s")));
    }
}
