namespace Seamwright.Core.Matching;

/// <summary>A tentative match between feature IndexA of the first image and IndexB of the second.</summary>
/// <param name="Distance">Hamming distance of the pair.</param>
/// <param name="SecondDistance">Hamming distance from A's feature to its second-best candidate in B.</param>
public readonly record struct FeatureMatch(int IndexA, int IndexB, int Distance, int SecondDistance)
{
    /// <summary>Distance over second-best distance (lower is more distinctive).</summary>
    public double Ratio => SecondDistance > 0 ? (double)Distance / SecondDistance : Distance == 0 ? 0 : 1;
}

/// <summary>Settings of the brute-force matcher.</summary>
public sealed record MatchOptions
{
    /// <summary>Ratio test bound (Lowe, IJCV 2004, used 0.8 for real-valued descriptors; common practice for binary ones too).</summary>
    public double MaxRatio { get; init; } = 0.8;

    /// <summary>Keep a match only when B's best partner in A is the same feature (mutual nearest neighbours).</summary>
    public bool Mutual { get; init; } = true;

    /// <summary>
    /// Two keypoints on different pyramid levels closer than this many pixels of the coarser level
    /// are the same corner (judgement: about the corner's localisation spread across levels).
    /// </summary>
    public double SameCornerRadius { get; init; } = 2.0;

    /// <summary>Largest Hamming distance accepted at all (of 256 bits).</summary>
    public int MaxDistance { get; init; } = 80;
}

/// <summary>Matches plus the counts that explain a poor result.</summary>
/// <param name="Matches">Best first (ratio, then distance, then indices), ready for a progressive sampler.</param>
/// <param name="AmbiguousCount">Features of A whose best match failed only the ratio test (a sign of repeated patterns).</param>
public sealed record MatchResult(FeatureMatch[] Matches, int AmbiguousCount);
