using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// One motion model for the sampling loop, local optimisation and polish (per-datum contract as in
/// RansacLib; the loop owns scoring, inlier selection and optimisation, so estimators stay small).
/// Implemented by readonly structs so the generic loop is specialised and inlined by the JIT.
/// </summary>
public interface IEstimator
{
    MotionModel Model { get; }

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

/// <summary>Homography: 4-point DLT, normalised DLT least squares.</summary>
public readonly struct HomographyEstimator : IEstimator
{
    public MotionModel Model => MotionModel.Homography;

    public int MinimalSampleSize => HomographySolver.MinimalSampleSize;

    public bool IsDegenerate(ReadOnlySpan<Correspondence> sample) =>
        SampleDegeneracy.HasRepeatedPoint(sample) || SampleDegeneracy.HasCollinearTriple(sample) || SampleDegeneracy.HasOrientationFlip(sample);

    public int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) =>
        HomographySolver.TryMinimal(sample, out models[0]) ? 1 : 0;

    public bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) =>
        HomographySolver.TryLeastSquares(data, out model);

    public double SquaredResidual(in Transform2D model, in Correspondence datum) => TransferError.ForwardSquared(model, datum);
}

/// <summary>Affine: 3 non-collinear matches, closed-form least squares.</summary>
public readonly struct AffineEstimator : IEstimator
{
    public MotionModel Model => MotionModel.Affine;

    public int MinimalSampleSize => AffineSolver.MinimalSampleSize;

    public bool IsDegenerate(ReadOnlySpan<Correspondence> sample) =>
        SampleDegeneracy.HasRepeatedPoint(sample) || SampleDegeneracy.HasCollinearTriple(sample) || SampleDegeneracy.HasOrientationFlip(sample);

    public int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) =>
        AffineSolver.TryFit(sample, out models[0]) ? 1 : 0;

    public bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => AffineSolver.TryFit(data, out model);

    public double SquaredResidual(in Transform2D model, in Correspondence datum) => TransferError.ForwardSquared(model, datum);
}

/// <summary>Similarity: 2 distinct matches, closed-form least squares.</summary>
public readonly struct SimilarityEstimator : IEstimator
{
    public MotionModel Model => MotionModel.Similarity;

    public int MinimalSampleSize => SimilaritySolver.MinimalSampleSize;

    public bool IsDegenerate(ReadOnlySpan<Correspondence> sample) => SampleDegeneracy.HasRepeatedPoint(sample);

    public int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) =>
        SimilaritySolver.TryFit(sample, out models[0]) ? 1 : 0;

    public bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => SimilaritySolver.TryFit(data, out model);

    public double SquaredResidual(in Transform2D model, in Correspondence datum) => TransferError.ForwardSquared(model, datum);
}

/// <summary>Translation: one match, mean shift.</summary>
public readonly struct TranslationEstimator : IEstimator
{
    public MotionModel Model => MotionModel.Translation;

    public int MinimalSampleSize => TranslationSolver.MinimalSampleSize;

    public bool IsDegenerate(ReadOnlySpan<Correspondence> sample) => false;

    public int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models) =>
        TranslationSolver.TryFit(sample, out models[0]) ? 1 : 0;

    public bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model) => TranslationSolver.TryFit(data, out model);

    public double SquaredResidual(in Transform2D model, in Correspondence datum) => TransferError.ForwardSquared(model, datum);
}
