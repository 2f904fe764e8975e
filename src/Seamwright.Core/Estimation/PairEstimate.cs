using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>Consensus (inlier count at the threshold) after each stage of the estimate.</summary>
/// <param name="Sampling">After seeded sampling with local optimisation.</param>
/// <param name="Refined">After the deterministic consensus refinement (equal to Sampling when it is off).</param>
/// <param name="Final">After the final polish and inlier re-selection.</param>
/// <param name="RunnerUp">Consensus of the best distinct runner-up model (0 when none).</param>
public sealed record ConsensusFigures(int Sampling, int Refined, int Final, int RunnerUp);

/// <summary>Wall-clock milliseconds per stage. Never part of a determinism comparison.</summary>
public sealed record EstimateTimings(double Sampling, double Refinement, double Polish, double Total);

/// <summary>
/// The immutable result of estimating one pairwise transform from tentative matches.
/// The transform maps pixels of the first image to the second.
/// </summary>
public sealed record PairEstimate
{
    public required MotionModel Model { get; init; }

    /// <summary>The best model found (also when rejected); null only when none exists.</summary>
    public required Transform2D? Transform { get; init; }

    public required int MatchCount { get; init; }

    /// <summary>Indices (into the input matches, ascending) of the final inliers.</summary>
    public required int[] InlierIndices { get; init; }

    public required ConsensusFigures Consensus { get; init; }

    public required double Threshold { get; init; }

    public required ulong Seed { get; init; }

    public required PairStatus Status { get; init; }

    /// <summary>Reasons in words, for the decision (empty only when accepted without remarks).</summary>
    public required string[] Reasons { get; init; }

    /// <summary>Largest standard deviation of a mapped corner of the first image (px), from the fit covariance.</summary>
    public required double CornerSigmaPx { get; init; }

    /// <summary>Root mean square forward transfer error over the final inliers (px).</summary>
    public required double RmsResidualPx { get; init; }

    /// <summary>Sampling iterations run.</summary>
    public required int Iterations { get; init; }

    /// <summary>Linear programs solved by the consensus refinement.</summary>
    public required int LpCount { get; init; }

    /// <summary>Why sampling and refinement stopped, in words.</summary>
    public required string[] Terminations { get; init; }

    public required EstimateTimings TimingsMs { get; init; }

    /// <summary>The features the estimate was made from (set by the pair flow; the estimator itself only sees correspondences).</summary>
    public FeaturePath FeaturePath { get; init; } = FeaturePath.Corners;
}
