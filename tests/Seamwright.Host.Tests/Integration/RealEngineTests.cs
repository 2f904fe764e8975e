using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;

namespace Seamwright.Host.Tests.Integration;

/// <summary>End to end with the real engine (loader, features, estimator) in the real process.</summary>
public class RealEngineTests
{
    [Fact]
    public void Run_ThreeShiftedViewsOfOneScene_AllPairsAcceptedWithTheKnownShifts()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in/strip"));
        var scene = new ProceduralScene(42);
        // Three 400 x 300 views of one texture, each 120 px further right: known ground truth.
        for (int i = 0; i < 3; i++)
        {
            var view = SceneRenderer.Render(scene, 400, 300, Transform2D.Translation(120.0 * i, 0));
            Pipeline.Output.ImageWriter.WritePng(dir.Sub($"in/strip/view{i + 1}.png"), view);
        }

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(5),
            "run", dir.Sub("in"), "--output", dir.Sub("out"), "--Seamwright:Engine=features");

        Assert.True(code == 0, $"exit {code}\n{stdout}\n{stderr}");
        var m = OutputChecks.ManifestIsComplete(dir.Sub("out/strip"));
        Assert.Equal(3, m.Counts.Accepted);
        Assert.Equal("features", m.Engine);
        var sidecar = OutputJson.ReadSidecar(dir.Sub("out/strip/view1.png.seam.json"));
        foreach (var link in sidecar.Links)
        {
            // view1 pixel (x, y) shows scene (x, y); view k shows it at x - 120 (k - 1).
            double expected = link.Other == "view2.png" ? -120 : -240;
            var t = Transform2D.FromRows(link.Transform!);
            var (u, v) = t.Apply(200, 150);
            Assert.InRange(u - 200, expected - 1, expected + 1);
            Assert.InRange(v - 150, -1, 1);
            Assert.True(link.InlierCount >= 20, $"{link.Other}: {link.InlierCount} inliers");
        }
    }
}

/// <summary>Unrelated images give rejected pairs, never a failed set (non-finite figures become null in JSON).</summary>
public class RealEngineUnrelatedImagesTests
{
    [Fact]
    public void Run_ThreeUnrelatedScenes_PairsRejectedAndEveryOutputParses()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in/mixed"));
        for (int i = 0; i < 3; i++)
        {
            var view = SceneRenderer.Render(new ProceduralScene(100 + (ulong)i, SceneStyle.Courtyard), 160, 120, Transform2D.Identity);
            Pipeline.Output.ImageWriter.WritePng(dir.Sub($"in/mixed/unrelated{i + 1}.png"), view);
        }

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(5),
            "run", dir.Sub("in"), "--output", dir.Sub("out"), "--Seamwright:Engine=features");

        Assert.True(code == 3, $"exit {code} (3 expected: finished with rejected pairs)\n{stdout}\n{stderr}");
        var m = OutputChecks.ManifestIsComplete(dir.Sub("out/mixed"));
        Assert.Equal(0, m.Counts.Accepted);
        foreach (string sidecar in Directory.GetFiles(dir.Sub("out/mixed"), "*.seam.json"))
        {
            Assert.All(OutputJson.ReadSidecar(sidecar).Links, l => Assert.NotEqual("accepted", l.Status));
        }
        Assert.All(File.ReadAllLines(dir.Sub("out/confidence.jsonl")), l => OutputJson.ReadConfidenceLine(l));
    }
}
