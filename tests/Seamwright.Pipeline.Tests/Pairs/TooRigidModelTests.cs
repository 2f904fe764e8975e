using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Pairs;

/// <summary>
/// Rendered pairs whose views differ by perspective (a camera turned about its centre), estimated
/// under a forced low-freedom model: the reason names the too-rigid model, not a repeated pattern.
/// </summary>
public class TooRigidModelTests(ITestOutputHelper output)
{
    private const int W = 640, H = 480;

    /// <summary>A: the scene straight on; B: the camera turned by <paramref name="yawDegrees"/> (and tilted a little) about its centre.</summary>
    private static (GrayImage A, GrayImage B) TurnedPair(SceneStyle style, double yawDegrees, double focal)
    {
        var scene = new ProceduralScene(33, style);
        var a = SceneRenderer.Render(scene, W, H, Transform2D.Identity);
        var turn = ViewTransforms.CameraRotation(focal, W / 2.0, H / 2.0, yawDegrees * Math.PI / 180, 6 * Math.PI / 180, 0);
        var b = SceneRenderer.Render(scene, W, H, turn.Inverse());
        return (a, b);
    }

    private PairOutcome Process(GrayImage a, GrayImage b, MotionModel model, string name)
    {
        var fa = ImageFeatureExtractor.Extract(a, null, FeatureSettings.Default);
        var fb = ImageFeatureExtractor.Extract(b, null, FeatureSettings.Default);
        var settings = PairSettings.Default with { Estimation = PairSettings.Default.Estimation with { Model = model } };
        var outcome = PairProcessor.Process(fa, fb, settings);
        output.WriteLine($"{name} ({model}): {outcome.Estimate.Status}, inliers {outcome.Estimate.InlierIndices.Length}/{outcome.MatchCount}; {string.Join(" | ", outcome.Estimate.Reasons)}");
        return outcome;
    }

    [Theory]
    [InlineData(SceneStyle.Courtyard, MotionModel.Similarity)]
    [InlineData(SceneStyle.EstateMap, MotionModel.Similarity)]
    [InlineData(SceneStyle.Courtyard, MotionModel.Affine)]
    public void Process_PerspectivePairUnderForcedRigidModel_ReasonNamesTheModelAndTheHomographyFit(SceneStyle style, MotionModel model)
    {
        var (a, b) = TurnedPair(style, 28, 420);

        var forced = Process(a, b, model, style.ToString());
        var free = Process(a, b, MotionModel.Homography, style.ToString());

        Assert.Equal(PairStatus.Accepted, free.Estimate.Status);
        Assert.NotEqual(PairStatus.Accepted, forced.Estimate.Status);
        string first = forced.Estimate.Reasons[0];
        Assert.StartsWith("too rigid a motion model: a homography fits ", first, StringComparison.Ordinal);
        Assert.Contains($"the forced {MotionFamily.Of(model).Name} model ({MotionFamily.Of(model).ParameterCount} degrees of freedom) kept {forced.Estimate.InlierIndices.Length}", first, StringComparison.Ordinal);
        Assert.Matches(@"leaves \d+\.\d px RMS residual", first);
        Assert.DoesNotContain(forced.Estimate.Reasons, r => r.Contains("repeated pattern", StringComparison.Ordinal));
        Assert.Equal(forced.Estimate.Reasons, forced.Estimate.Reasons.Distinct()); // the diagnosis once
    }

    [Fact]
    public void Process_SimilarViewsUnderForcedSimilarity_AcceptedWithoutDiagnosis()
    {
        var scene = new ProceduralScene(33, SceneStyle.EstateMap);
        var a = SceneRenderer.Render(scene, W, H, Transform2D.Identity);
        var b = SceneRenderer.Render(scene, W, H, ViewTransforms.SimilarityAbout(W / 2.0, H / 2.0, 1.02, 0.02, 60, -25).Inverse());

        var outcome = Process(a, b, MotionModel.Similarity, "similar views");

        Assert.Equal(PairStatus.Accepted, outcome.Estimate.Status);
        Assert.DoesNotContain(outcome.Estimate.Reasons, r => r.Contains("too rigid", StringComparison.Ordinal));
    }

    [Fact]
    public void Diagnose_ForcedHomographyOrAcceptedEstimate_NoDiagnosis()
    {
        var (a, b) = TurnedPair(SceneStyle.EstateMap, 28, 420);
        var free = Process(a, b, MotionModel.Homography, "homography");
        var matches = free.TiePoints;

        Assert.Null(TooRigidModel.Diagnose(matches, new ImageSize(W, H), new ImageSize(W, H), EstimationOptions.Default, free.Estimate with { Status = PairStatus.Rejected }));
        Assert.Null(TooRigidModel.Diagnose(matches, new ImageSize(W, H), new ImageSize(W, H), EstimationOptions.Default with { Model = MotionModel.Similarity }, free.Estimate));
    }
}
