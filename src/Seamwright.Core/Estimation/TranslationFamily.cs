using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// The translation: 2 degrees of freedom, shift only (flatbed or stage tiles without rotation).
/// Parameters (tx, ty).
/// </summary>
public sealed class TranslationFamily : MotionFamily
{
    internal TranslationFamily(MotionModel model)
        : base(model, "translation", 2, TranslationSolver.MinimalSampleSize)
    {
    }

    public override int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) => new TranslationEstimator().SolveMinimal(sample, models);

    public override bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => new TranslationEstimator().TrySolveLeastSquares(data, out model);

    internal override SamplingOutcome Sample(ReadOnlySpan<Correspondence> data, EstimationOptions options, SamplingSettings settings, ulong seed, SamplerKind kind) =>
        PairEstimator.Run(new TranslationEstimator(), data, options, settings, seed, kind);

    internal override void ToParameters(in Transform2D h, Span<double> p)
    {
        p[0] = h.M13; p[1] = h.M23;
    }

    internal override Transform2D FromParameters(ReadOnlySpan<double> p) => new(1, 0, p[0], 0, 1, p[1], 0, 0, 1);

    internal override void FillDerivatives(double iw, double xw, double yw, double u, double v, Span<double> du, Span<double> dv)
    {
        du[0] = iw; du[1] = 0;
        dv[0] = 0; dv[1] = iw;
    }

    /// <summary>In normalised coordinates a pixel shift keeps the diagonal s2 / s1, a constant of the rows.</summary>
    internal override void LinearRows(double x, double y, double translationScale, Span<double> uc, Span<double> vc, Span<double> wc, ref double u0, ref double v0)
    {
        uc[0] = 1; vc[1] = 1;
        u0 = translationScale * x; v0 = translationScale * y;
    }

    internal override Transform2D FromLinearParameters(ReadOnlySpan<double> theta, double translationScale) =>
        new(translationScale, 0, theta[0], 0, translationScale, theta[1], 0, 0, 1);

    internal override Transform2D ProjectPixel(in Transform2D h) => Transform2D.Translation(h.M13, h.M23);
}

/// <summary>Translation estimator: one match, mean shift.</summary>
public readonly struct TranslationEstimator : IEstimator
{
    public int MinimalSampleSize => TranslationSolver.MinimalSampleSize;

    public bool IsDegenerate(ReadOnlySpan<Correspondence> sample) => false;

    public int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) =>
        TranslationSolver.TryFit(sample, out models[0]) ? 1 : 0;

    public bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => TranslationSolver.TryFit(data, out model);

    public double SquaredResidual(in Transform2D model, in Correspondence datum) => TransferError.ForwardSquared(model, datum);
}
