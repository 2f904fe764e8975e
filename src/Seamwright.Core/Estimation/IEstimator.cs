using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// One motion model for the sampling loop, local optimisation and polish (per-datum contract as in
/// RansacLib; the loop owns scoring, inlier selection and optimisation, so estimators stay small).
/// Implemented by readonly structs so the generic loop is specialised and inlined by the JIT.
/// </summary>
public interface IEstimator
{
    /// <summary>Matches in a minimal sample.</summary>
    int MinimalSampleSize { get; }

    /// <summary>True when the sample cannot give a usable model (checked before solving).</summary>
    bool IsDegenerate(ReadOnlySpan<Correspondence> sample);

    /// <summary>Models through a minimal sample, written into <paramref name="models"/>; returns how many.</summary>
    int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models);

    /// <summary>Least-squares model over more than a minimal sample.</summary>
    bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model);

    /// <summary>Squared residual of one datum (forward transfer error; infinite when behind).</summary>
    double SquaredResidual(in Transform2D model, in Correspondence datum);
}
