using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Core.Tests.Estimation;

namespace Seamwright.Core.Tests.Geometry;

public class SolverTests
{
    private static Correspondence[] Exact(Transform2D truth, int count, ulong seed) =>
        SyntheticMatches.Generate(truth, SyntheticSweepTests.SizeA, SyntheticSweepTests.SizeB, count, 0, 0, seed).Matches;

    private static void AssertSame(Transform2D expected, Transform2D actual, double tolerance)
    {
        var corners = Transform2D.Corners(SyntheticSweepTests.SizeA.Width, SyntheticSweepTests.SizeA.Height);
        double d = Transform2D.MaxPointDistance(expected, actual, corners);
        Assert.True(d < tolerance, $"corners differ by {d} px");
    }

    [Theory]
    [InlineData(MotionModel.Translation)]
    [InlineData(MotionModel.Similarity)]
    [InlineData(MotionModel.Affine)]
    [InlineData(MotionModel.Homography)]
    public void Minimal_ExactSample_RecoversTruth(MotionModel model)
    {
        var truth = SyntheticSweepTests.TruthFor(model);
        var family = MotionFamily.Of(model);
        var sample = Exact(truth, family.MinimalSampleSize, 11);
        Span<Transform2D> models = stackalloc Transform2D[4];
        int count = family.SolveMinimal(sample, models);
        Assert.Equal(1, count);
        AssertSame(truth, models[0], 1e-6);
    }

    [Theory]
    [InlineData(MotionModel.Translation)]
    [InlineData(MotionModel.Similarity)]
    [InlineData(MotionModel.Affine)]
    [InlineData(MotionModel.Homography)]
    public void LeastSquares_ExactData_RecoversTruth(MotionModel model)
    {
        var truth = SyntheticSweepTests.TruthFor(model);
        var data = Exact(truth, 50, 12);
        bool ok = model switch
        {
            MotionModel.Translation => TranslationSolver.TryFit(data, out var t) && Check(t),
            MotionModel.Similarity => SimilaritySolver.TryFit(data, out var t) && Check(t),
            MotionModel.Affine => AffineSolver.TryFit(data, out var t) && Check(t),
            _ => HomographySolver.TryLeastSquares(data, out var t) && Check(t),
        };
        Assert.True(ok);

        bool Check(Transform2D t)
        {
            AssertSame(truth, t, 1e-6);
            return true;
        }
    }

    [Fact]
    public void AffineFit_CollinearPoints_Fails()
    {
        Correspondence[] s = [new(0, 0, 1, 1), new(10, 10, 11, 11), new(20, 20, 21, 21)];
        Assert.False(AffineSolver.TryFit(s, out _));
    }

    [Fact]
    public void HomographyMinimal_CollinearPoints_FailsOrIsRejectedAsDegenerate()
    {
        Correspondence[] s = [new(0, 0, 1, 1), new(10, 10, 11, 11), new(20, 20, 21, 21), new(30, 30, 31, 31)];
        Assert.True(new HomographyEstimator().IsDegenerate(s));
        Assert.False(HomographySolver.TryMinimal(s, out _));
    }

    [Fact]
    public void ForwardSquared_PointBehindViewer_IsInfinite()
    {
        var h = new Transform2D(1, 0, 0, 0, 1, 0, -0.01, 0, 1); // w = 1 - 0.01 x, negative beyond x = 100
        Assert.True(double.IsPositiveInfinity(TransferError.ForwardSquared(h, new Correspondence(200, 0, 0, 0))));
        Assert.Equal(0, TransferError.ForwardSquared(h, new Correspondence(50, 0, 100, 0)), 12);
    }

    [Fact]
    public void SymmetricSquared_ExactMatch_IsZero()
    {
        var h = SyntheticSweepTests.TruthFor(MotionModel.Homography);
        var m = Exact(h, 1, 3)[0];
        Assert.Equal(0, TransferError.SymmetricSquared(h, h.Inverse(), m), 9);
    }
}
