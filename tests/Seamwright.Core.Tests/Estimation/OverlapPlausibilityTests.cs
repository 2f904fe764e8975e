using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Estimation;

/// <summary>
/// Plausibility is judged over the overlap: two frames of a rotating camera 48 degrees apart
/// (65 degree field of view) share about a quarter of each image; the exact homography K R K^-1
/// (Hartley and Zisserman, MVG 2nd ed., section 8.4) sends the far corners of the first image
/// towards infinity in the second, which the whole-rectangle check calls implausible.
/// </summary>
public class OverlapPlausibilityTests
{
    private static readonly ImageSize Size = new(640, 480);
    private static readonly double Focal = 320 / Math.Tan(32.5 * Math.PI / 180);

    private static (Correspondence[] Matches, Transform2D AToB) WideRotationPair(ulong seed)
    {
        var aToB = ViewTransforms.CameraRotation(Focal, 319.5, 239.5, 48 * Math.PI / 180, 0, 0).Inverse().Normalized();
        var rng = new SyntheticRandom(seed);
        var matches = new List<Correspondence>();
        for (int gy = 0; gy < 20; gy++)
        {
            for (int gx = 0; gx < 40; gx++)
            {
                double x = 8 + gx * 15.8 + rng.NextDouble(), y = 8 + gy * 23.4 + rng.NextDouble();
                if (aToB.W(x, y) > 0 && aToB.TryApply(x, y, out double u, out double v) && u >= 0 && v >= 0 && u <= 639 && v <= 479)
                {
                    matches.Add(new Correspondence(x, y, u + 0.3 * rng.NextGaussian(), v + 0.3 * rng.NextGaussian()));
                }
            }
        }
        int inliers = matches.Count;
        for (int i = 0; i < inliers / 2; i++)
        {
            matches.Add(new Correspondence(639 * rng.NextDouble(), 479 * rng.NextDouble(), 639 * rng.NextDouble(), 479 * rng.NextDouble()));
        }
        return ([.. matches], aToB);
    }

    [Fact]
    public void FindProblem_WideRotationOverWholeImage_Implausible()
    {
        // The guard that the test below is meaningful: the true transform fails the old rule.
        var (_, truth) = WideRotationPair(3);
        Assert.NotNull(TransformSanity.FindProblem(truth, Size, new SanityLimits()));
    }

    [Fact]
    public void Estimate_WideRotationPair_AcceptedAndTrueOverTheOverlap()
    {
        var (matches, truth) = WideRotationPair(3);
        var e = PairEstimator.Estimate(matches, Size, Size, EstimationOptions.Default);
        Assert.Equal(PairStatus.Accepted, e.Status);
        var inlierCorners = OverlapRegion.Corners(matches, e.InlierIndices, Size);
        Assert.True(Transform2D.MaxPointDistance(e.Transform!.Value, truth, inlierCorners) < 1.5);
        Assert.True(e.CornerSigmaPx < 1, $"corner sigma over the overlap {e.CornerSigmaPx}");
    }

    [Fact]
    public void Corners_FewInliers_WholeImage()
    {
        Correspondence[] m = [new(10, 10, 0, 0), new(20, 30, 0, 0)];
        Assert.Equal(Transform2D.Corners(640, 480), OverlapRegion.Corners(m, [0, 1], Size));
    }

    [Fact]
    public void Corners_Inliers_TheirBoundingBox()
    {
        Correspondence[] m = [new(10, 40, 0, 0), new(200, 30, 0, 0), new(50, 300, 0, 0), new(120, 90, 0, 0), new(600, 470, 0, 0)];
        Assert.Equal([(10.0, 30.0), (200.0, 30.0), (200.0, 300.0), (10.0, 300.0)], OverlapRegion.Corners(m, [0, 1, 2, 3], Size));
    }
}
