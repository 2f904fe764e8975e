using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>The affine map: 6 degrees of freedom, a linear map plus shift. Parameters (m11, m12, m13, m21, m22, m23).</summary>
public sealed class AffineFamily : MotionFamily
{
    internal AffineFamily(MotionModel model)
        : base(model, "affine", 6, AffineSolver.MinimalSampleSize)
    {
    }

    public override int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) => new AffineEstimator().SolveMinimal(sample, models);

    public override bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => new AffineEstimator().TrySolveLeastSquares(data, out model);

    internal override SamplingOutcome Sample(ReadOnlySpan<Correspondence> data, EstimationOptions options, SamplingSettings settings, ulong seed, SamplerKind kind) =>
        PairEstimator.Run(new AffineEstimator(), data, options, settings, seed, kind);

    internal override void ToParameters(in Transform2D h, Span<double> p)
    {
        p[0] = h.M11; p[1] = h.M12; p[2] = h.M13; p[3] = h.M21; p[4] = h.M22; p[5] = h.M23;
    }

    internal override Transform2D FromParameters(ReadOnlySpan<double> p) => new(p[0], p[1], p[2], p[3], p[4], p[5], 0, 0, 1);

    internal override void FillDerivatives(double iw, double xw, double yw, double u, double v, Span<double> du, Span<double> dv)
    {
        du[0] = xw; du[1] = yw; du[2] = iw; du[3] = 0; du[4] = 0; du[5] = 0;
        dv[0] = 0; dv[1] = 0; dv[2] = 0; dv[3] = xw; dv[4] = yw; dv[5] = iw;
    }

    internal override void LinearRows(double x, double y, double translationScale, Span<double> uc, Span<double> vc, Span<double> wc, ref double u0, ref double v0)
    {
        uc[0] = x; uc[1] = y; uc[2] = 1;
        vc[3] = x; vc[4] = y; vc[5] = 1;
    }
}

/// <summary>Affine estimator: 3 non-collinear matches, closed-form least squares.</summary>
public readonly struct AffineEstimator : IEstimator
{
    public int MinimalSampleSize => AffineSolver.MinimalSampleSize;

    public bool IsDegenerate(ReadOnlySpan<Correspondence> sample) =>
        SampleDegeneracy.HasRepeatedPoint(sample) || SampleDegeneracy.HasCollinearTriple(sample) || SampleDegeneracy.HasOrientationFlip(sample);

    public int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) =>
        AffineSolver.TryFit(sample, out models[0]) ? 1 : 0;

    public bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => AffineSolver.TryFit(data, out model);

    public double SquaredResidual(in Transform2D model, in Correspondence datum) => TransferError.ForwardSquared(model, datum);
}
