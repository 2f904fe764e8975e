using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// The similarity: 4 degrees of freedom, rotation, uniform scale and shift. Parameters
/// (a, b, tx, ty) for [[a, -b, tx], [b, a, ty]].
/// </summary>
public sealed class SimilarityFamily : MotionFamily
{
    internal SimilarityFamily(MotionModel model)
        : base(model, "similarity", 4, SimilaritySolver.MinimalSampleSize)
    {
    }

    public override int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) => new SimilarityEstimator().SolveMinimal(sample, models);

    public override bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => new SimilarityEstimator().TrySolveLeastSquares(data, out model);

    internal override SamplingOutcome Sample(ReadOnlySpan<Correspondence> data, EstimationOptions options, SamplingSettings settings, ulong seed, SamplerKind kind) =>
        PairEstimator.Run(new SimilarityEstimator(), data, options, settings, seed, kind);

    internal override void ToParameters(in Transform2D h, Span<double> p)
    {
        p[0] = (h.M11 + h.M22) / 2; p[1] = (h.M21 - h.M12) / 2; p[2] = h.M13; p[3] = h.M23;
    }

    internal override Transform2D FromParameters(ReadOnlySpan<double> p) => new(p[0], -p[1], p[2], p[1], p[0], p[3], 0, 0, 1);

    internal override void FillDerivatives(double iw, double xw, double yw, double u, double v, Span<double> du, Span<double> dv)
    {
        du[0] = xw; du[1] = -yw; du[2] = iw; du[3] = 0;
        dv[0] = yw; dv[1] = xw; dv[2] = 0; dv[3] = iw;
    }

    internal override void LinearRows(double x, double y, double translationScale, Span<double> uc, Span<double> vc, Span<double> wc, ref double u0, ref double v0)
    {
        uc[0] = x; uc[1] = -y; uc[2] = 1;
        vc[0] = y; vc[1] = x; vc[3] = 1;
    }
}

/// <summary>Similarity estimator: 2 distinct matches, closed-form least squares.</summary>
public readonly struct SimilarityEstimator : IEstimator
{
    public int MinimalSampleSize => SimilaritySolver.MinimalSampleSize;

    public bool IsDegenerate(ReadOnlySpan<Correspondence> sample) => SampleDegeneracy.HasRepeatedPoint(sample);

    public int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) =>
        SimilaritySolver.TryFit(sample, out models[0]) ? 1 : 0;

    public bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => SimilaritySolver.TryFit(data, out model);

    public double SquaredResidual(in Transform2D model, in Correspondence datum) => TransferError.ForwardSquared(model, datum);
}
