using System.Text.Json;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Preview;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.Tests.Preview;
using SixLabors.ImageSharp;

namespace Seamwright.Pipeline.Tests.Alignment;

public sealed class SetVisualsTests
{
    [Fact]
    public void Build_TileFilesOnDisk_PreviewReportAndManifestSection()
    {
        using var scene = new TileScene(3, 2, 400, 300, 300, 220);
        string folder = Path.Combine(Path.GetTempPath(), "seamwright-visuals-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(folder);
        try
        {
            var paths = new List<string>();
            for (int i = 0; i < scene.Tiles.Count; i++)
            {
                string p = Path.Combine(folder, scene.Names[i]);
                scene.Tiles[i].SaveAsPng(p);
                paths.Add(p);
            }
            // An image that cannot be decoded: no thumbnail, no crash.
            string broken = Path.Combine(folder, "broken.png");
            File.WriteAllBytes(broken, [0x89, 0x50, 0x4E, 0x47, 1, 2, 3]);
            paths.Add(broken);
            var images = scene.Names.Select(n => new AlignedImage(n, scene.TileSize)).Append(new AlignedImage("broken.png", scene.TileSize)).ToList();
            var pairs = scene.Links(3).Select(l => new AlignedPair(l.ImageA, l.ImageB, Estimate(l.AToB, l.TiePoints.Length, PairStatus.Accepted), l.TiePoints)).ToList();
            pairs.Add(new AlignedPair(0, 6, Estimate(null, 0, PairStatus.Rejected), []));
            var alignment = SetAlignmentInputs.Align(images, pairs, MotionModel.Translation);
            Assert.Equal(6, alignment.PlacedCount);
            var files = new PreviewLoader(paths, new LimitSettings(), new MemoryBudget(1L << 30));
            var visuals = SetVisuals.Build("tiles", "7", "fp", images, pairs, alignment, files.Open);
            Assert.NotNull(visuals.PreviewJpeg);
            using (var preview = Image.Load(visuals.PreviewJpeg))
            {
                Assert.True(preview.Width > 300);
            }
            Assert.Equal(6, visuals.Report.Images.Count(i => i.ThumbnailJpeg is not null));
            Assert.Null(visuals.Report.Images[6].ThumbnailJpeg);
            Assert.Contains("broken.png is not placed", string.Join("\n", visuals.Report.Warnings), StringComparison.Ordinal);
            var section = ManifestAlignment.From(alignment, [.. images.Select(i => i.Name)]);
            Assert.Equal(scene.Names[alignment.Reference!.Value], section.Reference);
            Assert.Equal("broken.png", Assert.Single(section.Unplaced).Image);
            string json = JsonSerializer.Serialize(section);
            Assert.Contains("\"Components\"", json, StringComparison.Ordinal);
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    private static PairEstimate Estimate(Seamwright.Core.Geometry.Transform2D? t, int inliers, PairStatus status) => new()
    {
        Model = MotionModel.Translation,
        Transform = t,
        MatchCount = inliers + 5,
        InlierIndices = [.. Enumerable.Range(0, inliers)],
        Consensus = new ConsensusFigures(inliers, inliers, inliers, 0),
        Threshold = 3,
        Seed = 1,
        Status = status,
        Reasons = status == PairStatus.Rejected ? ["no overlap"] : [],
        CornerSigmaPx = 0.5,
        RmsResidualPx = 0.3,
        Iterations = 10,
        LpCount = 0,
        Terminations = [],
        TimingsMs = new EstimateTimings(0, 0, 0, 0),
    };
}
