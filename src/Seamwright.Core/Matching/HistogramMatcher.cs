using Seamwright.Core.Features.ScaleSpace;

namespace Seamwright.Core.Matching;

/// <summary>
/// Brute-force nearest neighbours of gradient-histogram descriptors by Euclidean distance, with
/// Lowe's ratio test (IJCV 2004, section 7.1) and the mutual check. The second-nearest neighbour is
/// the nearest one at another position, so one blob described in two directions does not make its
/// own match ambiguous. Distances are squared and exact (integer descriptors and integer dot products,
/// <see cref="HistogramDots"/>), so the result does not depend on the vector width of the machine.
/// </summary>
public static class HistogramMatcher
{
    public static MatchResult Match(ScaleSpaceFeatureSet a, ScaleSpaceFeatureSet b, MatchOptions options) =>
        Match(a, b, options, HistogramDots.Path.Best);

    internal static MatchResult Match(ScaleSpaceFeatureSet a, ScaleSpaceFeatureSet b, MatchOptions options, HistogramDots.Path path)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        ArgumentNullException.ThrowIfNull(options);
        if (a.Count == 0 || b.Count < 2)
        {
            return new MatchResult([], 0);
        }
        var (fa, na) = HistogramDots.Widen(a);
        var (fb, nb) = HistogramDots.Widen(b);
        var dots = new int[b.Count];
        var bestA = new int[b.Count];
        var bestDistA = new long[b.Count];
        Array.Fill(bestA, -1);
        Array.Fill(bestDistA, long.MaxValue);
        var forward = new (int Index, long Best, long Second)[a.Count];
        double ratio2 = options.MaxRatio * options.MaxRatio;
        for (int i = 0; i < a.Count; i++)
        {
            HistogramDots.Row(fa, i, fb, dots, path);
            forward[i] = Nearest(dots, na[i], i, nb, b, bestA, bestDistA);
        }
        var matches = new List<FeatureMatch>();
        int ambiguous = 0;
        for (int i = 0; i < a.Count; i++)
        {
            var (j, d1, d2) = forward[i];
            if (j < 0)
            {
                continue;
            }
            if (d1 >= ratio2 * d2)
            {
                ambiguous++;
                continue;
            }
            if (options.Mutual && bestA[j] != i)
            {
                continue;
            }
            matches.Add(new FeatureMatch(i, j, (int)d1, (int)Math.Min(int.MaxValue, d2)));
        }
        var sorted = matches.OrderBy(m => m.Ratio).ThenBy(m => m.Distance).ThenBy(m => m.IndexA).ThenBy(m => m.IndexB).ToArray();
        return new MatchResult(sorted, ambiguous);
    }

    private static (int, long, long) Nearest(ReadOnlySpan<int> dots, long na, int i, int[] nb, ScaleSpaceFeatureSet b, int[] bestA, long[] bestDistA)
    {
        int best = -1;
        long d1 = long.MaxValue, d2 = long.MaxValue;
        for (int j = 0; j < nb.Length; j++)
        {
            long d = na + nb[j] - 2 * (long)dots[j];
            if (d < bestDistA[j] || (d == bestDistA[j] && i < bestA[j]))
            {
                bestDistA[j] = d;
                bestA[j] = i;
            }
            if (d < d1)
            {
                if (best >= 0 && !SamePlace(b, best, j))
                {
                    d2 = d1;
                }
                d1 = d;
                best = j;
            }
            else if (d < d2 && !SamePlace(b, best, j))
            {
                d2 = d;
            }
        }
        return (best, d1, d2);
    }

    private static bool SamePlace(ScaleSpaceFeatureSet set, int p, int q)
    {
        var a = set.Keypoints[p];
        var b = set.Keypoints[q];
        return Math.Abs(a.X - b.X) < 0.5f && Math.Abs(a.Y - b.Y) < 0.5f && Math.Abs(a.Sigma - b.Sigma) < 0.01f * a.Sigma;
    }
}
