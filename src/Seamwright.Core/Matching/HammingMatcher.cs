using Seamwright.Core.Features;

namespace Seamwright.Core.Matching;

/// <summary>
/// Brute-force nearest neighbours in Hamming distance, with the ratio test (Lowe, IJCV 2004) and an
/// optional mutual check, in one pass over all pairs (A's three best and B's best are tracked together; <see cref="HammingScan"/>).
/// When keypoints are given, a feature is not its own rival: the same corner found again on a
/// neighbouring pyramid level (within <see cref="MatchOptions.SameCornerRadius"/> level pixels) is
/// skipped when choosing the second-best distance of the ratio test and is accepted by the mutual check.
/// </summary>
public static class HammingMatcher
{
    public static MatchResult Match(ReadOnlySpan<Descriptor256> a, ReadOnlySpan<Descriptor256> b, MatchOptions options) =>
        Match(a, b, default, default, options);

    public static MatchResult Match(ReadOnlySpan<Descriptor256> a, ReadOnlySpan<Descriptor256> b,
        ReadOnlySpan<Keypoint> keypointsA, ReadOnlySpan<Keypoint> keypointsB, MatchOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        int na = a.Length, nb = b.Length;
        bool positions = keypointsA.Length == na && keypointsB.Length == nb && na > 0;
        if (na == 0 || nb == 0)
        {
            return new MatchResult([], 0);
        }
        var top = new (int D, int J)[na * 3];
        var bBest = new int[nb];
        var bBestIndex = new int[nb];
        HammingScan.Run(a, b, top, bBest, bBestIndex);
        var matches = new List<FeatureMatch>();
        int ambiguous = 0;
        double radius = options.SameCornerRadius;
        for (int i = 0; i < na; i++)
        {
            var (best, j) = top[3 * i];
            if (best > options.MaxDistance)
            {
                continue;
            }
            int second = SecondDistance(top.AsSpan(3 * i, 3), keypointsB, positions, radius);
            if (best > options.MaxRatio * second)
            {
                ambiguous++;
                continue;
            }
            int back = bBestIndex[j];
            if (options.Mutual && back != i && !(positions && SameCorner(keypointsA[back], keypointsA[i], radius)))
            {
                continue;
            }
            matches.Add(new FeatureMatch(i, j, best, second));
        }
        matches.Sort(static (x, y) =>
        {
            int c = ((long)x.Distance * y.SecondDistance).CompareTo((long)y.Distance * x.SecondDistance);
            if (c != 0)
            {
                return c;
            }
            c = x.Distance.CompareTo(y.Distance);
            return c != 0 ? c : x.IndexA.CompareTo(y.IndexA);
        });
        return new MatchResult([.. matches], ambiguous);
    }

    /// <summary>Distance of the best candidate that is not the best one's own corner (the third best bounds it from below).</summary>
    private static int SecondDistance(ReadOnlySpan<(int D, int J)> top, ReadOnlySpan<Keypoint> kb, bool positions, double radius)
    {
        int second = top[1].J < 0 ? Descriptor256.Bits : top[1].D;
        if (!positions || top[1].J < 0 || !SameCorner(kb[top[0].J], kb[top[1].J], radius))
        {
            return second;
        }
        return top[2].J < 0 ? Descriptor256.Bits : top[2].D;
    }

    private static bool SameCorner(in Keypoint p, in Keypoint q, double radius)
    {
        double r = radius * Math.Max(p.Scale, q.Scale);
        double dx = p.X - q.X, dy = p.Y - q.Y;
        return p.Level != q.Level && dx * dx + dy * dy <= r * r;
    }
}
