using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Tests.Estimation;

public sealed class MotionFamilyTests
{
    public static TheoryData<MotionModel> Models() => [.. Enum.GetValues<MotionModel>()];

    [Fact]
    public void Registry_EveryEnumValue_HasOneFamilyInOrderOfFreedom()
    {
        var models = Enum.GetValues<MotionModel>();
        Assert.Equal(models, MotionFamily.All.Select(f => f.Model));
        foreach (var m in models)
        {
            Assert.Same(MotionFamily.All.Single(f => f.Model == m), MotionFamily.Of(m));
        }
        var counts = MotionFamily.All.Select(f => f.ParameterCount).ToArray();
        Assert.Equal(counts.Order(), counts);
        Assert.True(MotionFamily.Translation.IsSpecialCaseOf(MotionFamily.Homography));
        Assert.False(MotionFamily.Homography.IsSpecialCaseOf(MotionFamily.Affine));
        Assert.Throws<ArgumentOutOfRangeException>(() => MotionFamily.Of((MotionModel)99));
    }

    [Theory]
    [MemberData(nameof(Models))]
    public void Name_IsTheLowerCaseEnumWord_AndParsesBack(MotionModel model)
    {
        var family = MotionFamily.Of(model);
        // The word written into every output since before the families: the enum name in lower case.
        Assert.Equal(model.ToString().ToLowerInvariant(), family.Name);
        Assert.True(MotionFamily.TryParse(family.Name, out var parsed));
        Assert.Same(family, parsed);
        Assert.False(MotionFamily.TryParse(family.Name.ToUpperInvariant(), out _));
    }

    [Fact]
    public void NamesInWords_MostFreeFirst()
    {
        Assert.Equal("homography, affine, similarity or translation", MotionFamily.NamesInWords());
    }

    [Theory]
    [MemberData(nameof(Models))]
    public void Parameters_RoundTripThroughTheTransform(MotionModel model)
    {
        var family = MotionFamily.Of(model);
        var p = new double[family.ParameterCount];
        for (int i = 0; i < p.Length; i++)
        {
            p[i] = 0.1 * (i + 1) * (i % 2 == 0 ? 1 : -1);
        }
        var t = family.FromParameters(p);
        var back = new double[p.Length];
        family.ToParameters(t, back);
        Assert.Equal(p, back);
        Assert.Equal(1, t.M33);
    }

    [Theory]
    [MemberData(nameof(Models))]
    public void FillDerivatives_AgreeWithCentralDifferences(MotionModel model)
    {
        var family = MotionFamily.Of(model);
        int k = family.ParameterCount;
        var p = new double[k];
        family.ToParameters(new Transform2D(1.1, -0.2, 3, 0.15, 0.9, -2, 1e-3, -2e-3, 1), p);
        var h = family.FromParameters(p);
        Span<double> du = stackalloc double[k], dv = stackalloc double[k];
        Assert.True(family.MapWithJacobian(h, 12, -7, out _, out _, du, dv));
        for (int j = 0; j < k; j++)
        {
            const double step = 1e-6;
            var plus = (double[])p.Clone();
            var minus = (double[])p.Clone();
            plus[j] += step;
            minus[j] -= step;
            Assert.True(family.FromParameters(plus).TryApply(12, -7, out double up, out double vp));
            Assert.True(family.FromParameters(minus).TryApply(12, -7, out double um, out double vm));
            Assert.Equal((up - um) / (2 * step), du[j], 1e-5);
            Assert.Equal((vp - vm) / (2 * step), dv[j], 1e-5);
        }
    }

    [Theory]
    [MemberData(nameof(Models))]
    public void LinearRows_EvaluateToTheTransformOfTheirParameters(MotionModel model)
    {
        var family = MotionFamily.Of(model);
        int k = family.ParameterCount;
        var theta = new double[k];
        family.ToParameters(new Transform2D(1.1, -0.2, 3, 0.15, 0.9, -2, 1e-3, -2e-3, 1), theta);
        const double scale = 1.7, x = 0.4, y = -0.3;
        Span<double> uc = stackalloc double[k], vc = stackalloc double[k], wc = stackalloc double[k];
        double u0 = 0, v0 = 0;
        family.LinearRows(x, y, scale, uc, vc, wc, ref u0, ref v0);
        double u = u0, v = v0, w = 1;
        for (int j = 0; j < k; j++)
        {
            u += uc[j] * theta[j];
            v += vc[j] * theta[j];
            w += wc[j] * theta[j];
        }
        var h = family.FromLinearParameters(theta, scale);
        Assert.Equal(h.M11 * x + h.M12 * y + h.M13, u, 1e-12);
        Assert.Equal(h.M21 * x + h.M22 * y + h.M23, v, 1e-12);
        Assert.Equal(h.W(x, y), w, 1e-12);
        Assert.Equal(family.HasDepth, wc.ToArray().Any(c => c != 0));
    }

    [Theory]
    [MemberData(nameof(Models))]
    public void FitTransferError_ExactTiePoints_RecoversTheModel(MotionModel model)
    {
        var family = MotionFamily.Of(model);
        var truth = SyntheticSweepTests.TruthFor(model);
        var ties = new Correspondence[12];
        for (int i = 0; i < ties.Length; i++)
        {
            double x = 20 + 37 * (i % 4), y = 15 + 41 * (i / 4);
            Assert.True(truth.TryApply(x, y, out double u, out double v));
            ties[i] = new Correspondence(x, y, u, v);
        }
        var fit = family.FitTransferError(ties);
        Assert.NotNull(fit);
        Assert.True(Transform2D.MaxPointDistance(truth, fit.Value, Transform2D.Corners(200, 150)) < 1e-6);
    }
}
