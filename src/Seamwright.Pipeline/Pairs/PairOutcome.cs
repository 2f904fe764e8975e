using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Pipeline.Pairs;

/// <summary>Wall-clock milliseconds of the pair stages after feature extraction. Never part of a determinism comparison.</summary>
public sealed record PairTimings(double Matching, double Sampling, double Refinement, double Relocalization, double Polish, double Total);

/// <summary>The result of one pair: the estimate (transform from A to B in full-resolution pixels) and its evidence.</summary>
public sealed record PairOutcome
{
    public required PairEstimate Estimate { get; init; }

    /// <summary>Final inliers as full-resolution correspondences (re-localised where that succeeded), in match order.</summary>
    public required Correspondence[] TiePoints { get; init; }

    public required int FeatureCountA { get; init; }

    public required int FeatureCountB { get; init; }

    /// <summary>Tentative matches after the ratio test and the mutual check.</summary>
    public required int MatchCount { get; init; }

    /// <summary>Features of A whose best match failed the ratio test.</summary>
    public required int AmbiguousCount { get; init; }

    /// <summary>Matches re-localised at full resolution.</summary>
    public required int RelocalizedCount { get; init; }

    public required string PatternVersion { get; init; }

    public required PairTimings TimingsMs { get; init; }
}
