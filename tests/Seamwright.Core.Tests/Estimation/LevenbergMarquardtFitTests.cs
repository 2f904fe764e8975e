using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Estimation;

public class LevenbergMarquardtFitTests
{
    [Theory]
    [InlineData(MotionModel.Translation)]
    [InlineData(MotionModel.Similarity)]
    [InlineData(MotionModel.Affine)]
    [InlineData(MotionModel.Homography)]
    public void Fit_PerturbedStart_ConvergesToExactTruth(MotionModel model)
    {
        var truth = SyntheticSweepTests.TruthFor(model);
        var data = SyntheticMatches.Generate(truth, SyntheticSweepTests.SizeA, SyntheticSweepTests.SizeB, 40, 0, 0, 5).Matches;
        var start = Transform2D.Translation(2, -1.5) * truth;
        var corners = Transform2D.Corners(1200, 900);
        var fit = LevenbergMarquardtFit.Fit(model, data, start, corners);
        Assert.True(Transform2D.MaxPointDistance(fit.Transform, truth, corners) < 1e-6);
        Assert.True(fit.SumSquaredPx < 1e-12);
    }

    [Fact]
    public void Fit_MoreNoise_LargerCornerSigma()
    {
        var truth = SyntheticSweepTests.TruthFor(MotionModel.Homography);
        var corners = Transform2D.Corners(1200, 900);
        double Sigma(double noise) => LevenbergMarquardtFit.Fit(MotionModel.Homography,
            SyntheticMatches.Generate(truth, SyntheticSweepTests.SizeA, SyntheticSweepTests.SizeB, 100, 0, noise, 6).Matches, truth, corners).CornerSigmaPx;
        double low = Sigma(0.5), high = Sigma(2);
        Assert.True(high > 2 * low, $"sigma {low} at 0.5 px noise, {high} at 2 px");
    }

    [Fact]
    public void Fit_CornerSigma_MatchesSpreadOverRepeatedNoise()
    {
        // The covariance's corner sigma against the empirical spread of the fitted corner over
        // 200 independent noise draws (same geometry): they should agree within 30 %.
        var truth = SyntheticSweepTests.TruthFor(MotionModel.Affine);
        var baseSet = SyntheticMatches.Generate(truth, SyntheticSweepTests.SizeA, SyntheticSweepTests.SizeB, 60, 0, 0, 7).Matches;
        var corner = new (double X, double Y)[] { (1199, 899) };
        var rng = new Xoshiro256StarStar(70);
        var xs = new List<double>();
        var ys = new List<double>();
        double sigmaSum = 0;
        for (int k = 0; k < 200; k++)
        {
            var noisy = baseSet.Select(m => new Correspondence(m.X1, m.Y1, m.X2 + Normal(ref rng), m.Y2 + Normal(ref rng))).ToArray();
            var fit = LevenbergMarquardtFit.Fit(MotionModel.Affine, noisy, truth, corner);
            var (u, v) = fit.Transform.Apply(1199, 899);
            xs.Add(u);
            ys.Add(v);
            sigmaSum += fit.CornerSigmaPx;
        }
        double Sd(List<double> a) => Math.Sqrt(a.Sum(x => (x - a.Average()) * (x - a.Average())) / (a.Count - 1));
        double empirical = Math.Max(Sd(xs), Sd(ys));
        double predicted = sigmaSum / 200;
        Assert.InRange(predicted / empirical, 0.7, 1.3);
    }

    private static double Normal(ref Xoshiro256StarStar rng) =>
        Math.Sqrt(-2 * Math.Log(1 - rng.NextDouble())) * Math.Cos(2 * Math.PI * rng.NextDouble());

    [Fact]
    public void Fit_MinimalData_CornerSigmaUnknown()
    {
        var truth = SyntheticSweepTests.TruthFor(MotionModel.Homography);
        var data = SyntheticMatches.Generate(truth, SyntheticSweepTests.SizeA, SyntheticSweepTests.SizeB, 4, 0, 0, 8).Matches;
        Assert.True(double.IsNaN(LevenbergMarquardtFit.Fit(MotionModel.Homography, data, truth, Transform2D.Corners(10, 10)).CornerSigmaPx));
    }
}
