using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Processing;

public class SetProcessorTests
{
    [Fact]
    public void Process_SetOfFive_WritesSidecarsTiePointsConfidenceAndManifestListingThem()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/maps/sheet1"), 5, 10);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var set = session.Catalog.Discover().Single();
        Assert.Equal("maps/sheet1", set.SetId);

        var outcome = new SetProcessor(session.Context).Process(set, false, CancellationToken.None);

        Assert.Equal(SetOutcomeKind.Done, outcome.Kind);
        Assert.Equal(7, outcome.Summary!.Pairs); // 5 images, span 2: 4 + 3
        string setOut = dir.Sub("out/maps/sheet1");
        var manifest = OutputJson.ReadManifest(Path.Combine(setOut, OutputLayout.ManifestName));
        Assert.Equal(outcome.RunId, manifest.Run);
        Assert.Equal(5, manifest.Files.Count(f => f.Kind == "sidecar"));
        Assert.Equal(7, manifest.Files.Count(f => f.Kind == "tiepoints"));
        foreach (var f in manifest.Files)
        {
            byte[] bytes = File.ReadAllBytes(OutputLayout.Full(setOut, f.Path));
            Assert.Equal(f.Sha256, Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(bytes)));
        }
        var sidecar = OutputJson.ReadSidecar(Path.Combine(setOut, "img001.png.seam.json"));
        Assert.Equal(64, sidecar.Width);
        // Placed by the set alignment: a reference and a 3x3 transform into it; preview and report listed.
        Assert.NotNull(sidecar.Reference);
        Assert.Equal(3, sidecar.ToReference!.Length);
        Assert.Single(manifest.Files, f => f.Kind == "report");
        Assert.NotNull(manifest.Alignment);
        Assert.Equal(sidecar.Reference, manifest.Alignment.Reference);
        Assert.Equal(new[] { "img002.png", "img003.png" }, sidecar.Links.Select(l => l.Other));
        var records = ConfidenceLog.ReadAll(Path.Combine(dir.Sub("out"), ConfidenceLog.FileName));
        Assert.Equal(7, records.Count(r => r.Run == outcome.RunId && r.Kind == "pair"));
        // The manifest is the newest output of the set: written after every file it lists.
        var manifestTime = File.GetLastWriteTimeUtc(Path.Combine(setOut, OutputLayout.ManifestName));
        Assert.All(manifest.Files, f => Assert.True(File.GetLastWriteTimeUtc(OutputLayout.Full(setOut, f.Path)) <= manifestTime));
    }

    [Fact]
    public void Process_BrokenFiles_RecordedWithReasonsRestProceedsInputsUntouched()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 4, 1);
        File.WriteAllText(dir.Sub("in/s/text.png"), "this is not an image");
        byte[] good = TestImages.Png(99);
        File.WriteAllBytes(dir.Sub("in/s/truncated.png"), good[..(good.Length / 2)]);
        File.WriteAllBytes(dir.Sub("in/s/empty.png"), []);
        var before = TestImages.Hashes(dir.Sub("in"));
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());

        var outcome = new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);

        Assert.Equal(SetOutcomeKind.Done, outcome.Kind);
        Assert.Equal(4, outcome.Summary!.Images);
        Assert.Equal(3, outcome.Summary.BadFiles);
        var bad = session.Context.Store.Files().Where(f => f.State == "bad").ToDictionary(f => f.Path, f => f.Reason);
        Assert.Contains("not an image", bad["s/text.png"], StringComparison.Ordinal);
        Assert.Contains("empty", bad["s/empty.png"], StringComparison.Ordinal);
        Assert.NotNull(bad["s/truncated.png"]);
        var records = ConfidenceLog.ReadAll(Path.Combine(dir.Sub("out"), ConfidenceLog.FileName));
        Assert.Equal(3, records.Count(r => r.Kind == "file" && r.Status == "bad-file"));
        Assert.Equal(before, TestImages.Hashes(dir.Sub("in")));
    }

    [Fact]
    public void Process_ImageRemovedThenRedone_OldSidecarAndTiesRemovedAfterNewManifest()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 4, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var processor = new SetProcessor(session.Context);
        processor.Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        File.Delete(dir.Sub("in/s/img004.png"));
        var set = session.Catalog.Discover().Single();
        Assert.False(session.Context.IsUpToDate(set));

        processor.Process(set, false, CancellationToken.None);

        Assert.False(File.Exists(dir.Sub("out/s/img004.png.seam.json")));
        var manifest = OutputJson.ReadManifest(dir.Sub("out/s/" + OutputLayout.ManifestName));
        var listed = manifest.Files.Select(f => f.Path).ToHashSet();
        var onDisk = Directory.EnumerateFiles(dir.Sub("out/s"), "*", SearchOption.AllDirectories)
            .Select(f => Path.GetRelativePath(dir.Sub("out/s"), f).Replace('\\', '/')).Where(f => f != OutputLayout.ManifestName).ToHashSet();
        Assert.Equal(listed, onDisk);
        Assert.True(session.Context.IsUpToDate(session.Catalog.Discover().Single()));
    }

    [Fact]
    public void Process_SecondPassWithCache_NoDecodesAndIdenticalSidecarsApartFromRun()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var processor = new SetProcessor(session.Context);
        processor.Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        string first = File.ReadAllText(dir.Sub("out/s/img002.png.seam.json"));
        processor.Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        string second = File.ReadAllText(dir.Sub("out/s/img002.png.seam.json"));

        Assert.All(session.Context.Store.Files(), f => Assert.Equal(1, f.Analyses)); // second pass hit the feature cache
        Assert.Equal(first.Replace("\"run\": 1,", "", StringComparison.Ordinal), second.Replace("\"run\": 2,", "", StringComparison.Ordinal));
    }

    [Fact]
    public void Discover_FramesPattern_FormsSetsAcrossCameraFolders()
    {
        using var dir = new ScratchFolder();
        foreach (var cam in new[] { "cam1", "cam2", "cam3" })
        {
            Directory.CreateDirectory(dir.Sub("in/" + cam));
            for (int f = 1; f <= 2; f++)
            {
                File.WriteAllBytes(dir.Sub($"in/{cam}/frame{f:D4}.png"), TestImages.Png(f));
            }
        }
        var options = Sessions.Options(p => p.Pairing.Mode = PairingMode.Frames);
        options.Run.SetPattern = @"^(?<camera>cam\d+)/frame(?<frame>\d+)\.png$";
        options.Run.SetKeyGroups = ["frame"];
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), options);
        var sets = session.Catalog.Discover();
        Assert.Equal(new[] { "frame-0001", "frame-0002" }, sets.Select(s => s.SetId));
        var outcome = new SetProcessor(session.Context).Process(sets[0], false, CancellationToken.None);
        Assert.Equal(3, outcome.Summary!.Pairs);
        Assert.True(File.Exists(dir.Sub("out/frame-0001/cam2/frame0001.png.seam.json")));
    }

    [Fact]
    public void Discover_OutputInsideWatchedRoot_NeverIngested()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("in/results"), Sessions.Options());
        new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        File.WriteAllBytes(dir.Sub("in/results/s/looks-like-input.png"), TestImages.Png(5));
        Assert.Equal(new[] { "s" }, session.Catalog.Discover().Select(s => s.SetId));
    }
}
