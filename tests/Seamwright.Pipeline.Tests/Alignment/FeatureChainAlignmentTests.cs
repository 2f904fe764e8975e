using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Alignment;

/// <summary>
/// The whole chain on rendered views with exact truth: features, pairwise estimates with
/// full-resolution tie points, then the set alignment; every image's corners against the truth.
/// </summary>
public sealed class FeatureChainAlignmentTests(ITestOutputHelper output)
{
    [Fact]
    public void Align_RenderedTilesOfAMap_CornersWithinOnePixelOfTruth()
    {
        var scene = new ProceduralScene(4242, SceneStyle.EstateMap);
        const int columns = 2, rows = 2, width = 480, height = 360;
        var views = new List<SceneView>();
        for (int r = 0; r < rows; r++)
        {
            for (int c = 0; c < columns; c++)
            {
                // Tiles overlap by about a third, each slightly turned and scaled, as a hand-placed scan would be.
                var local = ViewTransforms.SimilarityAbout(width / 2.0, height / 2.0, 1 + 0.02 * ((r + c) % 2), 0.015 * c - 0.01 * r);
                views.Add(new SceneView(width, height, Transform2D.Translation(c * 320 + 9 * r, r * 240 - 6 * c) * local));
            }
        }
        var features = views.Select(v => ImageFeatureExtractor.Extract(SceneRenderer.Render(scene, v), null, FeatureSettings.Default)).ToList();
        var pairs = new List<AlignedPair>();
        for (int i = 0; i < views.Count; i++)
        {
            foreach (int j in new[] { i + 1, i + columns })
            {
                if (j >= views.Count || (j == i + 1 && j % columns == 0))
                {
                    continue;
                }
                var outcome = PairProcessor.Process(features[i], features[j], PairSettings.Default);
                output.WriteLine($"pair {i}-{j}: {outcome.Estimate.Status}, {outcome.Estimate.InlierIndices.Length} inliers, {outcome.TiePoints.Length} tie points, corner sigma {outcome.Estimate.CornerSigmaPx:0.00} px");
                pairs.Add(new AlignedPair(i, j, outcome.Estimate, outcome.TiePoints));
            }
        }
        var images = views.Select((v, i) => new AlignedImage($"tile{i}.png", v.Size)).ToList();
        var alignment = SetAlignmentInputs.Align(images, pairs, MotionModel.Homography);
        Assert.Equal(views.Count, alignment.PlacedCount);
        int reference = alignment.Reference!.Value;
        double sum = 0, max = 0;
        int n = 0;
        foreach (var p in alignment.Images)
        {
            var truth = SceneView.Between(views[p.Index], views[reference]);
            foreach (var (x, y) in Transform2D.Corners(width, height))
            {
                var (u, v) = p.ToReference!.Value.Apply(x, y);
                var (tu, tv) = truth.Apply(x, y);
                double d = Math.Sqrt((u - tu) * (u - tu) + (v - tv) * (v - tv));
                sum += d;
                max = Math.Max(max, d);
                n++;
            }
        }
        var res = alignment.Components[0].Residuals;
        output.WriteLine($"reference tile{reference}; corners vs truth mean {sum / n:0.000} px, max {max:0.000} px; tie residual RMS tree {res.TreeRmsPx:0.000} px, joint {res.JointRmsPx:0.000} px");
        Assert.True(sum / n < 1.0, $"mean corner error {sum / n} px");
    }
}
