using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;

namespace Seamwright.Pipeline.Tests.Processing;

/// <summary>The publishing stage's documents, built in memory from hand-made stage results.</summary>
public class SetDocumentsTests
{
    private static readonly OutputStamp Stamp = new("checksum", "none", 1001, "9.9.9");

    [Fact]
    public void Build_ChainWithOneRejectedPair_TiePointsForTheOthersSidecarPerImageReportLast()
    {
        var good = new[] { "a.png", "b.png", "c.png", "d.png" }.Select(k => StageInputs.Image(k)).ToList();
        var run = StageInputs.Run(good);
        var pairs = StageInputs.Chain(good, rejected: 1);

        var files = SetDocuments.Build(run, Stamp, pairs, Align(run, pairs));

        Assert.Equal(new[] { "seam-ties/a.png+b.png.json", "seam-ties/c.png+d.png.json" }, files.Where(f => f.Kind == "tiepoints").Select(f => f.Relative));
        Assert.Equal(good.Select(g => g.Key + ".seam.json"), files.Where(f => f.Kind == "sidecar").Select(f => f.Relative));
        Assert.Equal("report", files[^1].Kind);
        Assert.Equal(files.Count, files.Select(f => f.Relative).Distinct(StringComparer.Ordinal).Count());
    }

    [Fact]
    public void Sidecar_MiddleImage_LinksBothWaysWithWordsStampAndTiePointPaths()
    {
        var good = new[] { "a.png", "b.png", "c.png" }.Select(k => StageInputs.Image(k)).ToList();
        var run = StageInputs.Run(good);
        var pairs = StageInputs.Chain(good, rejected: 1);
        var ties = new Dictionary<int, string> { [0] = "seam-ties/a.png+b.png.json" };

        var sidecar = SetDocuments.Sidecar(run, Stamp, pairs, Align(run, pairs), 1, ties);

        Assert.Equal("b.png", sidecar.Image);
        Assert.Equal(new[] { "a.png", "c.png" }, sidecar.Links.Select(l => l.Other));
        Assert.Equal(new[] { PairStatusWords.Accepted, PairStatusWords.Rejected }, sidecar.Links.Select(l => l.Status));
        Assert.Equal("seam-ties/a.png+b.png.json", sidecar.Links[0].TiePoints);
        Assert.Null(sidecar.Links[1].TiePoints);
        Assert.Null(sidecar.Links[1].Transform);
        Assert.Equal(("fp0123", 7L, "9.9.9", 1001), (sidecar.SettingsFingerprint, sidecar.Run, sidecar.ToolVersion, sidecar.AlgorithmVersion));
    }

    [Fact]
    public void TiePoints_RejectedPair_None()
    {
        var good = new[] { "a.png", "b.png" }.Select(k => StageInputs.Image(k)).ToList();
        var pairs = StageInputs.Chain(good, rejected: 0);

        Assert.Null(SetDocuments.TiePoints(StageInputs.Run(good), pairs, pairs.Pairs[0]));
    }

    [Fact]
    public void ManifestAndRecords_BadFileAndPlanSkip_CountedListedAndLoggedOncePerFile()
    {
        var good = new[] { "a.png", "b.png", "c.png" }.Select(k => StageInputs.Image(k)).ToList();
        var all = good.Append(StageInputs.Bad("x.png", "not an image")).ToList();
        var run = StageInputs.Run(all, incomplete: true);
        var chain = StageInputs.Chain(good, rejected: 1);
        var pairs = chain with { Plan = chain.Plan with { Skipped = [("c.png", "no capture time")] } };
        var entries = new[] { new ManifestEntry("z.json", "sidecar", "00"), new ManifestEntry("a.json", "sidecar", "11") };

        var summary = SetManifest.Summary(run, all, pairs);
        var manifest = SetManifest.Build(run, Stamp, all, pairs, summary, null!, entries, "2026-01-01T00:00:00Z");
        var records = RunRecords.Confidence(run, all, pairs, "2026-01-01T00:00:00Z");

        Assert.Equal((3, 2, 2, 1, 0, 1, true), (summary.Images, summary.BadFiles, summary.Pairs, summary.Accepted, summary.Weak, summary.Rejected, summary.Incomplete));
        Assert.Equal(new[] { "x.png", "c.png" }, manifest.Skipped.Select(s => s.Image));
        Assert.Equal(new[] { "a.json", "z.json" }, manifest.Files.Select(f => f.Path));
        Assert.Equal(new[] { "file", "file", "pair", "pair" }, records.Select(r => r.Kind));
        Assert.Equal(RunRecords.BadFileStatus, records[0].Status);
        // a bad file has no figures: null, never 0 (which reads as perfect)
        Assert.Equal((null, null, null, null, null), (records[0].InlierCount, records[0].MatchCount, records[0].RmsResidualPx, records[0].Seed, records[0].TimingsMs));
        Assert.All(records, r => Assert.Equal("2026-01-01T00:00:00Z", r.Time));
        Assert.Equal("2026-01-01T00:00:00Z", manifest.Time);
        Assert.All(records, r => Assert.Equal("fp0123", r.SettingsFingerprint));
        Assert.Equal(new[] { "accepted", "rejected" }, RunRecords.PairRows(pairs).Select(r => r.Status));
    }

    private static AlignmentStageResult Align(SetRun run, PairStageResult pairs) =>
        SetAlignmentStage.Run(run.SetId, "7", run.Fingerprint, pairs.Images.Select(g => new AlignedImage(g.Key, g.Analysis!.Size)).ToList(),
            pairs.Images.Select(g => g.File.FullPath).ToList(),
            pairs.Pairs.Select(p => new AlignedPair(p.A, p.B, p.Estimate, p.Analysis.TiePoints)).ToList(),
            run.Profile.Estimation.MotionModel, run.Profile.Alignment, (_, _) => null);
}
