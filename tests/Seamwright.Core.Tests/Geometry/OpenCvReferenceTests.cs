using OpenCvSharp;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Core.Tests.Estimation;

namespace Seamwright.Core.Tests.Geometry;

/// <summary>
/// Our normalised DLT followed by our Levenberg-Marquardt (on all data) against the reference
/// library OpenCvSharp4 (OpenCV) <c>Cv2.FindHomography</c> with method 0 (least squares on all
/// points, then its own Levenberg-Marquardt step on the forward error).
/// </summary>
public class OpenCvReferenceTests
{
    private static Transform2D Ours(Correspondence[] data)
    {
        Assert.True(HomographySolver.TryLeastSquares(data, out var dlt));
        return LevenbergMarquardtFit.Fit(MotionModel.Homography, data, dlt, []).Transform;
    }

    private static Transform2D OpenCv(Correspondence[] data)
    {
        var src = data.Select(m => new Point2d(m.X1, m.Y1)).ToArray();
        var dst = data.Select(m => new Point2d(m.X2, m.Y2)).ToArray();
        using var h = Cv2.FindHomography(src, dst, HomographyMethods.None);
        var v = new double[9];
        for (int r = 0; r < 3; r++)
        {
            for (int c = 0; c < 3; c++)
            {
                v[r * 3 + c] = h.At<double>(r, c);
            }
        }
        return Transform2D.FromRowMajor(v).Normalized();
    }

    [Fact]
    public void Homography_ExactData_AgreesWithOpenCvWithin1e6Relative()
    {
        var truth = SyntheticSweepTests.TruthFor(MotionModel.Homography);
        var data = SyntheticMatches.Generate(truth, SyntheticSweepTests.SizeA, SyntheticSweepTests.SizeB, 60, 0, 0, 21).Matches;
        var ours = Ours(data).ToRowMajor();
        var cv = OpenCv(data).ToRowMajor();
        double diff = Math.Sqrt(ours.Zip(cv, (a, b) => (a - b) * (a - b)).Sum());
        double norm = Math.Sqrt(cv.Sum(a => a * a));
        Assert.True(diff / norm < 1e-6, $"relative Frobenius difference {diff / norm:E2}");
    }

    [Theory]
    [InlineData(0.5, 31UL)]
    [InlineData(1.0, 32UL)]
    [InlineData(2.0, 33UL)]
    public void Homography_NoisyData_MeanTransferWithin005PxOfOpenCv(double noise, ulong seed)
    {
        var truth = SyntheticSweepTests.TruthFor(MotionModel.Homography);
        var data = SyntheticMatches.Generate(truth, SyntheticSweepTests.SizeA, SyntheticSweepTests.SizeB, 200, 0, noise, seed).Matches;
        var ours = Ours(data);
        var cv = OpenCv(data);
        double mean = data.Average(m =>
        {
            var (a, b) = ours.Apply(m.X1, m.Y1);
            var (c, d) = cv.Apply(m.X1, m.Y1);
            return Math.Sqrt((a - c) * (a - c) + (b - d) * (b - d));
        });
        Assert.True(mean <= 0.05, $"mean transfer difference {mean:0.0000} px");
    }
}
