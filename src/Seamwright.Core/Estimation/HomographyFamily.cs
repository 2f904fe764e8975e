using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// The homography: 8 degrees of freedom, the full plane projective transform (h33 = 1). Parameters
/// (m11, m12, m13, m21, m22, m23, m31, m32); its w depends on them.
/// </summary>
public sealed class HomographyFamily : MotionFamily
{
    internal HomographyFamily(MotionModel model)
        : base(model, "homography", 8, HomographySolver.MinimalSampleSize)
    {
    }

    internal override bool HasDepth => true;

    public override int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) => new HomographyEstimator().SolveMinimal(sample, models);

    public override bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => new HomographyEstimator().TrySolveLeastSquares(data, out model);

    /// <summary>The normalised DLT minimises an algebraic error; Levenberg-Marquardt recentres it on the transfer error.</summary>
    public override Transform2D? FitTransferError(ReadOnlySpan<Correspondence> ties)
    {
        if (!TrySolveLeastSquares(ties, out var linear) || !linear.IsFinite)
        {
            return null;
        }
        var fit = LevenbergMarquardtFit.Fit(Model, ties, linear, []);
        return fit.Transform.IsFinite ? fit.Transform : linear;
    }

    internal override SamplingOutcome Sample(ReadOnlySpan<Correspondence> data, EstimationOptions options, SamplingSettings settings, ulong seed, SamplerKind kind) =>
        PairEstimator.Run(new HomographyEstimator(), data, options, settings, seed, kind);

    internal override void ToParameters(in Transform2D h, Span<double> p)
    {
        p[0] = h.M11; p[1] = h.M12; p[2] = h.M13; p[3] = h.M21; p[4] = h.M22; p[5] = h.M23; p[6] = h.M31; p[7] = h.M32;
    }

    internal override Transform2D FromParameters(ReadOnlySpan<double> p) => new(p[0], p[1], p[2], p[3], p[4], p[5], p[6], p[7], 1);

    internal override void FillDerivatives(double iw, double xw, double yw, double u, double v, Span<double> du, Span<double> dv)
    {
        du[0] = xw; du[1] = yw; du[2] = iw; du[3] = 0; du[4] = 0; du[5] = 0; du[6] = -u * xw; du[7] = -u * yw;
        dv[0] = 0; dv[1] = 0; dv[2] = 0; dv[3] = xw; dv[4] = yw; dv[5] = iw; dv[6] = -v * xw; dv[7] = -v * yw;
    }

    internal override void LinearRows(double x, double y, double translationScale, Span<double> uc, Span<double> vc, Span<double> wc, ref double u0, ref double v0)
    {
        uc[0] = x; uc[1] = y; uc[2] = 1;
        vc[3] = x; vc[4] = y; vc[5] = 1;
        wc[6] = x; wc[7] = y;
    }

    internal override Transform2D ProjectPixel(in Transform2D h)
    {
        double m33 = Math.Abs(h.M33);
        return m33 > 1e-300 && double.IsFinite(m33) ? h.Scale(1 / m33) : h;
    }
}

/// <summary>Homography estimator: 4-point DLT, normalised DLT least squares.</summary>
public readonly struct HomographyEstimator : IEstimator
{
    public int MinimalSampleSize => HomographySolver.MinimalSampleSize;

    public bool IsDegenerate(ReadOnlySpan<Correspondence> sample) =>
        SampleDegeneracy.HasRepeatedPoint(sample) || SampleDegeneracy.HasCollinearTriple(sample) || SampleDegeneracy.HasOrientationFlip(sample);

    public int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) =>
        HomographySolver.TryMinimal(sample, out models[0]) ? 1 : 0;

    public bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) =>
        HomographySolver.TryLeastSquares(data, out model);

    public double SquaredResidual(in Transform2D model, in Correspondence datum) => TransferError.ForwardSquared(model, datum);
}
