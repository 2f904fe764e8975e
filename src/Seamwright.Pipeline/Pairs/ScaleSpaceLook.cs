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

    public void Validate()
    {
        ArgumentNullException.ThrowIfNull(Detector);
        Detector.Validate();
        ArgumentOutOfRangeException.ThrowIfNegative(FewInliers);
    }
}
