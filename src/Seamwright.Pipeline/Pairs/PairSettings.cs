using Seamwright.Core.Estimation;
using Seamwright.Core.Matching;

namespace Seamwright.Pipeline.Pairs;

/// <summary>Settings of one pair from features to decision. The estimation threshold is in full-resolution pixels.</summary>
public sealed record PairSettings
{
    public static PairSettings Default { get; } = new();

    public EstimationOptions Estimation { get; init; } = EstimationOptions.Default;

    public MatchOptions Matching { get; init; } = new();

    /// <summary>Fewer corners than this (above the noise floor) in either image: "too little texture". Judgement: a homography needs a few dozen to be checked.</summary>
    public int MinFeatures { get; init; } = 30;

    /// <summary>Fewer distinctive matches than this: not estimated.</summary>
    public int MinMatches { get; init; } = 12;

    /// <summary>
    /// Share of an image's sampled corners with a near-identical twin in the same image above which a
    /// pair that is not accepted is reported as a repeated pattern. Measured: the 32 homogr images
    /// score 0.04-0.58 (text on a whiteboard is the highest), an exactly tiled pattern 1.0.
    /// </summary>
    public double RepeatedPatternFraction { get; init; } = 0.75;

    /// <summary>Match again with an accepted first estimate as prior (null: off).</summary>
    public GuidedMatchOptions? Guided { get; init; } = new();

    /// <summary>Re-localise tie points at full resolution before the final polish.</summary>
    public bool Relocalize { get; init; } = true;

    /// <summary>Smallest normalised cross-correlation of a re-localised tie point.</summary>
    public double MinCorrelation { get; init; } = 0.8;

    /// <summary>The scale-space second look for pairs the corner path cannot decide (null: corners only).</summary>
    public ScaleSpaceLook? ScaleSpace { get; init; } = new();

    public void Validate()
    {
        ArgumentNullException.ThrowIfNull(Estimation);
        ScaleSpace?.Validate();
        ArgumentNullException.ThrowIfNull(Matching);
        Estimation.Validate();
        if (MinFeatures < 1 || MinMatches < 1 || MinCorrelation is < -1 or > 1 || Matching.MaxRatio is <= 0 or > 1)
        {
            throw new ArgumentException("Invalid pair settings: " + this);
        }
    }
}
