using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Report;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Report;

/// <summary>The report opens with a verdict in words and names every file that is not in the result, with its reason.</summary>
public sealed class ReportVerdictTests
{
    [Fact]
    public void Report_SetWithABadFile_OpensWithVerdictProvenanceAndNamesTheBadFile()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        File.WriteAllText(dir.Sub("in/s/broken.png"), "not an image");
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        string html = File.ReadAllText(dir.Sub("out/s/report.html"));

        int verdict = html.IndexOf("id=\"verdict\"", StringComparison.Ordinal);
        Assert.True(verdict > 0 && verdict < html.IndexOf("<h2>Preview</h2>", StringComparison.Ordinal), "the verdict comes first");
        // The checksum engine accepts every planned pair and places every good image: the bad file is the only gap.
        Assert.Contains("usable with gaps: 3 of 4 images placed, 3 of 3 expected pairs accepted (1 input files unusable (listed below))", html, StringComparison.Ordinal);
        Assert.Contains("<b>broken.png</b>: unusable, not an image in a supported format", html, StringComparison.Ordinal);
        Assert.Contains(dir.Sub("in/s"), html, StringComparison.Ordinal);
        Assert.Contains("<dt>Tool version</dt><dd>" + ProcessingContext.ToolVersion, html, StringComparison.Ordinal);
        Assert.Contains("threshold 3 px", html, StringComparison.Ordinal);
        Assert.Contains("seed 20261201", html, StringComparison.Ordinal);
        Assert.Matches(@"written <!--volatile-->\d{4}-\d\d-\d\d \d\d:\d\d:\d\d UTC<!--/volatile-->", html);
    }

    [Fact]
    public void Report_RealRun_NamesThePairModelAndTheChosenSetModelOnce()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        string html = File.ReadAllText(dir.Sub("out/s/report.html"));
        var manifest = System.Text.Json.Nodes.JsonNode.Parse(File.ReadAllText(dir.Sub("out/s/" + OutputLayout.ManifestName)))!;
        string chosen = manifest["alignment"]?["setModel"]?["model"]?.GetValue<string>() ?? manifest["alignment"]!["motionModel"]!.GetValue<string>();

        // The settings say what was asked (the pairs' model, the set-model setting); the Alignment panel what was chosen.
        Assert.Contains("pair model homography, set model auto (", html, StringComparison.Ordinal);
        Assert.DoesNotContain("motion model homography", html, StringComparison.OrdinalIgnoreCase);
        Assert.Single(System.Text.RegularExpressions.Regex.Matches(html, "<dt>Set model</dt>"));
        Assert.Contains("<dt>Set model</dt><dd>" + chosen + "</dd>", html, StringComparison.Ordinal);
        Assert.Contains("<dt>Pair model</dt><dd>homography (each pair&#39;s estimate)</dd>", html, StringComparison.Ordinal);
    }

    [Fact]
    public void Verdict_NothingPlaced_NotUsableAndNoPlaneClaimed()
    {
        var sizes = Enumerable.Range(0, 5).Select(_ => new Seamwright.Core.Geometry.ImageSize(400, 300)).ToList();
        var alignment = SetAligner.Align(sizes, [], MotionModel.Homography);
        var names = Enumerable.Range(0, 5).Select(i => $"f{i}.jpg").ToList();
        var pairs = Enumerable.Range(0, 4).Select(i => new ReportPair(names[i], names[i + 1], "rejected", 0, 3, double.NaN, double.NaN, ["too little texture"], null)).ToList();

        var v = ReportVerdict.Judge(alignment, pairs, names, leftOut: 0);
        var plane = Assert.Single(AlignmentSummary.Facts(alignment, names), f => f.Label == "Fits one plane");

        Assert.Equal("not usable", v.Level);
        Assert.StartsWith($"not usable: {alignment.PlacedCount} of 5 images placed, 0 of 4 expected pairs accepted", v.Text, StringComparison.Ordinal);
        Assert.True(alignment.PlacedCount < 2);
        Assert.NotEqual("yes", plane.Value);
    }

    [Fact]
    public void Verdict_EverythingPlacedAndAccepted_Usable()
    {
        var report = ReportSample.Build(out var alignment);
        var accepted = report.Pairs.Where(p => p.Status == "accepted").ToList();
        var v = ReportVerdict.Judge(alignment, accepted, report.Images.Select(i => i.Name).ToList(), leftOut: 0);
        Assert.Equal($"usable: 6 of 6 images placed, {accepted.Count} of {accepted.Count} expected pairs accepted", v.Text);
    }

    [Fact]
    public void Verdict_FramesPlacedByTheirCameraOnly_CountAsPlacedAndAreNotProblems()
    {
        // A rotation set's frames that look away from the reference have no plane transform but a camera block.
        var sizes = Enumerable.Range(0, 5).Select(_ => new Seamwright.Core.Geometry.ImageSize(400, 300)).ToList();
        var alignment = SetAligner.Align(sizes, [], MotionModel.Homography);
        var names = Enumerable.Range(0, 5).Select(i => $"f{i}.jpg").ToList();
        var pairs = Enumerable.Range(0, 4).Select(i => new ReportPair(names[i], names[i + 1], "accepted", 100, 120, 0.3, 0.1, [], null)).ToList();
        var unplaced = alignment.Images.Where(p => !p.IsPlaced).Select(p => p.Index).ToList();
        Assert.True(unplaced.Count >= 2);
        var offPlane = new string?[5];
        foreach (int i in unplaced.Skip(1))
        {
            offPlane[i] = "looks away from the reference image's plane";
        }

        var v = ReportVerdict.Judge(alignment, pairs, names, leftOut: 0, offPlane);
        var placedFact = Assert.Single(AlignmentSummary.Facts(alignment, names, offPlane), f => f.Label == "Placed images");

        int byCamera = unplaced.Count - 1;
        Assert.Equal($"usable with gaps: 4 of 5 images placed ({byCamera} by their camera only), 4 of 4 expected pairs accepted (1 images not placed)", v.Text);
        Assert.Equal($"4 of 5 ({alignment.PlacedCount} on the reference plane, {byCamera} by their camera only)", placedFact.Value);
        offPlane[unplaced[0]] = "looks away from the reference image's plane";
        Assert.Equal("usable", ReportVerdict.Judge(alignment, pairs, names, leftOut: 0, offPlane).Level);
        // Without camera blocks the same alignment is what it was: fewer than two images placed.
        Assert.StartsWith($"not usable: {alignment.PlacedCount} of 5 images placed, ", ReportVerdict.Judge(alignment, pairs, names, leftOut: 0).Text, StringComparison.Ordinal);
    }
}
