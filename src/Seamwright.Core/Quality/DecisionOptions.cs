namespace Seamwright.Core.Quality;

/// <summary>Rules of the accepted / weak / rejected decision. See DEVELOPERS.md for the reasoning.</summary>
public sealed record DecisionOptions
{
    /// <summary>
    /// Rejected below the model's minimal sample size plus this many inliers. Default 4 (issue 2:
    /// fewer than minimum + 4 inliers must never be accepted).
    /// </summary>
    public int MinInliersAboveMinimal { get; init; } = 4;

    /// <summary>Weak below this many inliers. Default 10 (judgement: a few redundant matches beyond the model's freedom).</summary>
    public int ConfidentInliers { get; init; } = 10;

    /// <summary>Weak below this inlier ratio (inliers / matches). Default 0.1 (judgement).</summary>
    public double MinInlierRatio { get; init; } = 0.1;

    /// <summary>
    /// Weak when the runner-up's support beyond its minimal sample reaches this share of the best's.
    /// Default 0.5 (judgement: half the evidence for a different placement is a real ambiguity).
    /// </summary>
    public double RunnerUpCloseRatio { get; init; } = 0.5;

    /// <summary>
    /// Weak when the corner standard deviation exceeds this many thresholds. Default 10 (judgement: as
    /// far as a distinct runner-up must move a corner; corners far outside a narrow overlap are
    /// naturally uncertain while the overlap itself stays accurate).
    /// </summary>
    public double MaxCornerSigmaThresholds { get; init; } = 10;

    /// <summary>Brown and Lowe (IJCV 2007) verification: inliers &gt; alpha + beta x matches in the overlap. alpha = 8.</summary>
    public double BrownLoweAlpha { get; init; } = 8;

    /// <summary>Brown and Lowe (IJCV 2007) verification, beta = 0.3.</summary>
    public double BrownLoweBeta { get; init; } = 0.3;

    public void Validate()
    {
        if (MinInliersAboveMinimal < 0 || ConfidentInliers < 0 || !(MinInlierRatio is >= 0 and <= 1) ||
            !(RunnerUpCloseRatio > 0) || !(MaxCornerSigmaThresholds > 0) || !(BrownLoweAlpha >= 0) || !(BrownLoweBeta >= 0))
        {
            throw new ArgumentException("Invalid decision options: counts and ratios must be non-negative, the runner-up ratio and corner limit positive.");
        }
    }
}
