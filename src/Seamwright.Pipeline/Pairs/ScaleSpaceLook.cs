using Seamwright.Core.Estimation;
using Seamwright.Core.Features.ScaleSpace;

namespace Seamwright.Pipeline.Pairs;

/// <summary>
/// When the pair flow tries the scale-space features after the corners: a pair the corner path
/// leaves weak, rejected or with fewer than <see cref="FewInliers"/> inliers, unless an image has
/// too little texture or a repeated pattern (a second detector finds no more in blank paper, and
/// is fooled by a periodic pattern as the corners are).
/// </summary>
public sealed record ScaleSpaceLook
{
    public ScaleSpaceOptions Detector { get; init; } = new();

    /// <summary>
    /// Accepted corner results with fewer final inliers than this are also tried (judgement: about
    /// three times the inliers below which a decision is weak, DecisionOptions.ConfidentInliers = 10).
    /// </summary>
    public int FewInliers { get; init; } = 30;

    /// <summary>
    /// As a last step for a pair both feature paths reject, match simulated tilted views of each image
    /// against the other (Morel and Yu 2009). Costly (17 views per image), so only for such pairs.
    /// </summary>
    public bool AffineViews { get; init; } = true;

    /// <summary>Simulated tilts sqrt(2)^1..sqrt(2)^n (3: up to 2.8, a camera about 70 degrees off the other's axis).</summary>
    public int Tilts { get; init; } = 3;

    /// <summary>Strongest scale-space features kept per simulated view.</summary>
    public int FeaturesPerView { get; init; } = 1000;

    /// <summary>Whether a corner result is undecided enough for the second look (the texture and repeated-pattern exclusions read from its own words).</summary>
    public bool Wants(PairEstimate corners)
    {
        ArgumentNullException.ThrowIfNull(corners);
        return !corners.Terminations.Contains(PairProcessor.NoTexture)
            && !corners.Reasons.Any(r => r.StartsWith(PairProcessor.RepeatedPatternPrefix, StringComparison.Ordinal))
            && (corners.Status != PairStatus.Accepted || corners.Consensus.Final < FewInliers);
    }

    public void Validate()
    {
        ArgumentNullException.ThrowIfNull(Detector);
        Detector.Validate();
        ArgumentOutOfRangeException.ThrowIfNegative(FewInliers);
        ArgumentOutOfRangeException.ThrowIfLessThan(Tilts, 1);
        ArgumentOutOfRangeException.ThrowIfLessThan(FeaturesPerView, 1);
    }
}
