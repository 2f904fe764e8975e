using Seamwright.Core.Features;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Core.Matching;
using Seamwright.Core.Synthetic;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Features;

/// <summary>Features of a synthetic scene and a view of it under a known transform: matches must agree with the truth.</summary>
public class FeatureMatchingGroundTruthTests(ITestOutputHelper output)
{
    private const int W = 640, H = 480;

    public static TheoryData<string, double, double, double> Views => new()
    {
        { "rotate 30", 30, 1.0, 0 },
        { "rotate 180", 180, 1.0, 0 },
        { "rotate 95 zoom out 0.5", 95, 0.5, 0 },
        { "zoom in 2", -10, 2.0, 0 },
        { "perspective", 15, 0.9, 0.0004 },
    };

    [Theory]
    [MemberData(nameof(Views))]
    public void Match_KnownView_MostMatchesAgreeWithTruth(string name, double degrees, double scale, double perspective)
    {
        var scene = new ProceduralScene(7, SceneStyle.Courtyard);
        var a = SceneRenderer.Render(scene, W, H, Transform2D.Identity);
        var truth = ViewTransform(degrees, scale, perspective);
        var b = ImageEffects.AddGaussianNoise(
            ImageEffects.AdjustBrightnessContrast(SceneRenderer.Render(scene, W, H, truth.Inverse()), 0.8, 20), 2, 3);
        var options = new CornerDetectorOptions { MaxFeatures = 2000 };
        var fa = OrientedCornerExtractor.Extract(a, null, options);
        var fb = OrientedCornerExtractor.Extract(b, null, options);
        var result = HammingMatcher.Match(fa.Descriptors, fb.Descriptors, new MatchOptions());
        int good = 0;
        foreach (var m in result.Matches)
        {
            var ka = fa.Keypoints[m.IndexA];
            var kb = fb.Keypoints[m.IndexB];
            var (u, v) = truth.Apply(ka.X, ka.Y);
            if (Math.Sqrt((u - kb.X) * (u - kb.X) + (v - kb.Y) * (v - kb.Y)) < 3 * Math.Max(1, scale))
            {
                good++;
            }
        }
        output.WriteLine($"{name}: features {fa.Count}/{fb.Count}, matches {result.Matches.Length}, agree {good}, ambiguous {result.AmbiguousCount}");
        Assert.True(good >= 40, $"{name}: only {good} of {result.Matches.Length} matches agree with the truth");
        Assert.True(good >= 0.5 * result.Matches.Length, $"{name}: {good} of {result.Matches.Length} agree");
    }

    /// <summary>Rotation and zoom about the image centre, then a little perspective.</summary>
    internal static Transform2D ViewTransform(double degrees, double scale, double perspective)
    {
        double t = degrees * Math.PI / 180, c = Math.Cos(t) * scale, s = Math.Sin(t) * scale;
        var toCentre = Transform2D.Translation(-W / 2.0, -H / 2.0);
        var rot = new Transform2D(c, -s, 0, s, c, 0, perspective, perspective * 0.5, 1);
        return Transform2D.Translation(W / 2.0, H / 2.0) * rot * toCentre;
    }
}
