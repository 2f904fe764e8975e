using System.Text.Json;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Host.Commands;
using Seamwright.Pipeline.Output;

namespace Seamwright.Host.Tests.Commands;

public sealed class PairCommandTests : IDisposable
{
    private readonly string _folder = Path.Combine(Path.GetTempPath(), "sw-pair-" + Guid.NewGuid().ToString("N"));

    public PairCommandTests()
    {
        Directory.CreateDirectory(_folder);
        var scene = new ProceduralScene(12, SceneStyle.Courtyard);
        ImageWriter.WritePng(Path.Combine(_folder, "a.png"), SceneRenderer.Render(scene, 480, 360, Transform2D.Identity));
        var view = ViewTransforms.SimilarityAbout(240, 180, 0.9, 0.3, 12, -8);
        ImageWriter.WritePng(Path.Combine(_folder, "b.png"), SceneRenderer.Render(scene, 480, 360, view.Inverse()));
        File.WriteAllText(Path.Combine(_folder, "fake.jpg"), "not an image");
    }

    public void Dispose() => Directory.Delete(_folder, recursive: true);

    private string P(string name) => Path.Combine(_folder, name);

    [Fact]
    public void Run_TwoImagesJson_FieldsOfEstimatePlusImagesFeaturesAndTimings()
    {
        var o = new StringWriter();
        var e = new StringWriter();
        int code = PairCommand.Run([P("a.png"), P("b.png"), "--json", "--seed", "7"], o, e);
        Assert.Equal(ExitCodes.Ok, code);
        using var doc = JsonDocument.Parse(o.ToString());
        var r = doc.RootElement;
        foreach (string field in new[] { "model", "homography", "matchCount", "inlierCount", "inlierIndices", "consensus", "threshold", "seed", "status", "reasons", "cornerSigmaPx", "rmsResidualPx" })
        {
            Assert.True(r.TryGetProperty(field, out _), "missing " + field);
        }
        Assert.Equal(480, r.GetProperty("imageA").GetProperty("width").GetInt32());
        Assert.Equal(360, r.GetProperty("imageB").GetProperty("height").GetInt32());
        Assert.True(r.GetProperty("featureCount").GetProperty("a").GetInt32() > 100);
        Assert.Equal("sw-bin256-v1", r.GetProperty("descriptorPattern").GetString());
        Assert.Equal(7UL, r.GetProperty("seed").GetUInt64());
        Assert.Equal("accepted", r.GetProperty("status").GetString());
        foreach (string t in new[] { "load", "features", "matching", "sampling", "refinement", "polish", "total" })
        {
            Assert.True(r.GetProperty("timingsMs").TryGetProperty(t, out _), "missing timing " + t);
        }
        // A's centre (240, 180) goes where the view put it.
        var h = r.GetProperty("homography");
        double[] m = [.. h.EnumerateArray().SelectMany(row => row.EnumerateArray().Select(v => v.GetDouble()))];
        var (u, v) = Transform2D.FromRowMajor(m).Apply(240, 180);
        Assert.InRange(u, 251, 253);
        Assert.InRange(v, 171, 173);
    }

    [Fact]
    public void Run_SameArgumentsTwice_JsonIdenticalExceptTimings()
    {
        string Once()
        {
            var o = new StringWriter();
            Assert.Equal(ExitCodes.Ok, PairCommand.Run([P("a.png"), P("b.png"), "--json"], o, new StringWriter()));
            string s = o.ToString();
            return s[..s.IndexOf("\"timingsMs\"", StringComparison.Ordinal)];
        }
        Assert.Equal(Once(), Once());
    }

    [Fact]
    public void Run_BadImage_ExitTwoWithOneLineNamingTheFile()
    {
        var e = new StringWriter();
        int code = PairCommand.Run([P("a.png"), P("fake.jpg")], new StringWriter(), e);
        Assert.Equal(ExitCodes.BadArguments, code);
        string message = e.ToString().TrimEnd();
        Assert.DoesNotContain('\n', message);
        Assert.Contains("fake.jpg", message, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_MissingSecondImageOrBadOption_ExitTwo()
    {
        Assert.Equal(ExitCodes.BadArguments, PairCommand.Run([P("a.png")], new StringWriter(), new StringWriter()));
        Assert.Equal(ExitCodes.BadArguments, PairCommand.Run([P("a.png"), P("b.png"), "--threshold", "-1"], new StringWriter(), new StringWriter()));
        Assert.Equal(ExitCodes.BadArguments, PairCommand.Run([P("a.png"), P("b.png"), "--mask-a", P("nothing.txt")], new StringWriter(), new StringWriter()));
    }
}
