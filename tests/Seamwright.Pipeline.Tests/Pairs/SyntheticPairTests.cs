using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Pairs;

/// <summary>
/// Ground truth made by the project: a procedural scene rendered as image A and, through a known
/// homography, as image B; the estimate must carry A's corners to where the truth puts them.
/// </summary>
public class SyntheticPairTests(ITestOutputHelper output)
{
    private const int W = 800, H = 600;

    public static TheoryData<string, double, double, double, double> Views => new()
    {
        // name, rotation (degrees), zoom, perspective, noise sigma (with a brightness and contrast change)
        { "rotate 20", 20, 1.0, 0, 0 },
        { "rotate 180", 180, 1.0, 0, 0 },
        { "rotate 120 zoom 0.5", 120, 0.5, 0, 0 },
        { "zoom 2", -8, 2.0, 0, 0 },
        { "perspective", 10, 0.9, 0.0003, 0 },
        { "noise and lighting", 45, 0.8, 0.0001, 4 },
    };

    [Theory]
    [MemberData(nameof(Views))]
    public void Process_KnownHomography_CornersWithinOnePixel(string name, double degrees, double zoom, double perspective, double noise)
    {
        var scene = new ProceduralScene(21, SceneStyle.EstateMap);
        var a = SceneRenderer.Render(scene, W, H, Transform2D.Identity);
        var truth = View(W, H, degrees, zoom, perspective);
        var b = SceneRenderer.Render(scene, W, H, truth.Inverse());
        if (noise > 0)
        {
            b = ImageEffects.AddGaussianNoise(ImageEffects.AdjustBrightnessContrast(b, 0.8, 25), noise, 9);
        }
        var outcome = Process(a, b);
        double error = CornerError(outcome.Estimate, truth, W, H);
        output.WriteLine($"{name}: {outcome.Estimate.Status}, inliers {outcome.Estimate.Consensus.Final}/{outcome.MatchCount}, corner error {error:F3} px");
        Assert.NotEqual(PairStatus.Rejected, outcome.Estimate.Status);
        Assert.True(error <= 1.0, $"{name}: corner error {error:F3} px");
    }

    [Fact]
    public void Process_TwentyFourMegapixelPair_CornersWithinOneAndAHalfFullResolutionPixels()
    {
        const int w = 6000, h = 4000;
        var scene = new ProceduralScene(5, SceneStyle.Courtyard, 2.0);
        var a = SceneRenderer.Render(scene, w, h, Transform2D.Identity, samplesPerAxis: 1);
        var truth = View(w, h, 7, 0.93, 0.00002);
        // B by warping A (bilinear): far cheaper than a second scene render at this size.
        var b = ImageWarper.Warp(a, truth, w, h, 128);
        var outcome = Process(a, b);
        double error = CornerError(outcome.Estimate, truth, w, h);
        output.WriteLine($"24 MP: {outcome.Estimate.Status}, inliers {outcome.Estimate.Consensus.Final}/{outcome.MatchCount}, re-localised {outcome.RelocalizedCount}, corner error {error:F3} px");
        Assert.NotEqual(PairStatus.Rejected, outcome.Estimate.Status);
        Assert.True(error <= 1.5, $"corner error {error:F3} full-resolution px");
    }

    [Fact]
    public void Process_BlankPaper_RejectedForTooLittleTexture()
    {
        var a = ImageEffects.AddGaussianNoise(ImageEffects.Blank(W, H, 205), 2.0, 1);
        var b = ImageEffects.AddGaussianNoise(ImageEffects.Blank(W, H, 198), 2.0, 2);
        var outcome = Process(a, b);
        output.WriteLine($"blank: features {outcome.FeatureCountA}/{outcome.FeatureCountB}; {string.Join("; ", outcome.Estimate.Reasons)}");
        Assert.Equal(PairStatus.Rejected, outcome.Estimate.Status);
        Assert.Contains(outcome.Estimate.Reasons, r => r.Contains("too little texture", StringComparison.Ordinal));
    }

    [Fact]
    public void Process_PeriodicPattern_NotAcceptedAndNamedRepeated()
    {
        var a = ImageEffects.PeriodicPattern(W, H, 40, 3);
        var b = ImageWarper.Warp(a, Transform2D.Translation(13, 7), W, H, 128);
        var outcome = Process(a, b);
        output.WriteLine($"periodic: {outcome.Estimate.Status}, matches {outcome.MatchCount}, ambiguous {outcome.AmbiguousCount}; {string.Join("; ", outcome.Estimate.Reasons)}");
        Assert.NotEqual(PairStatus.Accepted, outcome.Estimate.Status);
        Assert.Contains(outcome.Estimate.Reasons, r => r.Contains("repeated pattern", StringComparison.Ordinal));
    }

    [Fact]
    public void Process_SameInputsTwice_BitIdenticalOutcome()
    {
        var scene = new ProceduralScene(8, SceneStyle.Courtyard);
        var a = SceneRenderer.Render(scene, 500, 400, Transform2D.Identity);
        var b = SceneRenderer.Render(scene, 500, 400, View(500, 400, 30, 1.1, 0).Inverse());
        var first = Process(a, b);
        var second = Process(a, b);
        Assert.Equal(first.Estimate.Transform, second.Estimate.Transform);
        Assert.Equal(first.TiePoints, second.TiePoints);
        Assert.Equal(first.Estimate.InlierIndices, second.Estimate.InlierIndices);
    }

    private static PairOutcome Process(GrayImage a, GrayImage b)
    {
        var fa = ImageFeatureExtractor.Extract(a, null, FeatureSettings.Default);
        var fb = ImageFeatureExtractor.Extract(b, null, FeatureSettings.Default);
        return PairProcessor.Process(fa, fb, PairSettings.Default);
    }

    /// <summary>Rotation and zoom about the image centre, with a little perspective: maps A's pixels to B's.</summary>
    internal static Transform2D View(int w, int h, double degrees, double zoom, double perspective)
    {
        var similarity = ViewTransforms.SimilarityAbout(w / 2.0, h / 2.0, zoom, degrees * Math.PI / 180);
        var tilt = Transform2D.Translation(w / 2.0, h / 2.0)
            * new Transform2D(1, 0, 0, 0, 1, 0, perspective, perspective * 0.5, 1)
            * Transform2D.Translation(-w / 2.0, -h / 2.0);
        return tilt * similarity;
    }

    private static double CornerError(PairEstimate e, Transform2D truth, int w, int h) =>
        e.Transform is { } t ? Transform2D.MaxPointDistance(t, truth, Transform2D.Corners(w, h)) : double.PositiveInfinity;
}
