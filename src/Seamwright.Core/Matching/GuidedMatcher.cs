using Seamwright.Core.Features;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Matching;

/// <summary>Settings of matching with a transform as prior.</summary>
public sealed record GuidedMatchOptions
{
    /// <summary>Search window: a B feature is a candidate when it lies within this many pixels of A's predicted position.</summary>
    public double Radius { get; init; } = 4.0;

    /// <summary>Largest Hamming distance accepted (of 256 bits; looser than the unguided matcher's, the window does the rest).</summary>
    public int MaxDistance { get; init; } = 96;

    /// <summary>
    /// Ratio of the best to the second-best distance among candidates in the window that are not the
    /// same corner (Lowe's test, IJCV 2004, relaxed because the window already excludes most rivals).
    /// </summary>
    public double MaxRatio { get; init; } = 0.9;

    /// <summary>A candidate's pyramid scale may differ from the predicted one by at most this factor either way.</summary>
    public double MaxScaleRatio { get; init; } = 1.6;

    /// <summary>Candidates closer than this (pixels of the coarser level) to the best are the same corner, not rivals.</summary>
    public double SameCornerRadius { get; init; } = 2.0;
}

/// <summary>
/// Matching again after a first estimate (guided matching, Hartley and Zisserman, MVG 2nd ed.,
/// section 11.6 step (v)): each feature of A is compared only with the features of B near where the
/// transform puts it, at a consistent scale, so a weaker descriptor agreement suffices. Mutual:
/// each B feature keeps its best A. Deterministic: results sorted by distance, then indices.
/// </summary>
public static class GuidedMatcher
{
    public static FeatureMatch[] Match(ReadOnlySpan<Descriptor256> descriptorsA, ReadOnlySpan<Descriptor256> descriptorsB,
        ReadOnlySpan<Keypoint> keypointsA, ReadOnlySpan<Keypoint> keypointsB, in Transform2D aToB, GuidedMatchOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        if (descriptorsA.Length != keypointsA.Length || descriptorsB.Length != keypointsB.Length)
        {
            throw new ArgumentException("Each descriptor needs its keypoint.");
        }
        double r = options.Radius;
        var grid = new Dictionary<(int, int), List<int>>();
        for (int j = 0; j < keypointsB.Length; j++)
        {
            var key = ((int)Math.Floor(keypointsB[j].X / r), (int)Math.Floor(keypointsB[j].Y / r));
            if (!grid.TryGetValue(key, out var list))
            {
                grid[key] = list = [];
            }
            list.Add(j);
        }
        var bestForB = new Dictionary<int, FeatureMatch>();
        for (int i = 0; i < keypointsA.Length; i++)
        {
            if (BestInWindow(i, descriptorsA[i], keypointsA[i], descriptorsB, keypointsB, grid, aToB, options) is not { } m)
            {
                continue;
            }
            if (!bestForB.TryGetValue(m.IndexB, out var held) || m.Distance < held.Distance)
            {
                bestForB[m.IndexB] = m;
            }
        }
        var result = bestForB.Values.ToArray();
        Array.Sort(result, static (x, y) =>
        {
            int c = x.Distance.CompareTo(y.Distance);
            return c != 0 ? c : x.IndexA != y.IndexA ? x.IndexA.CompareTo(y.IndexA) : x.IndexB.CompareTo(y.IndexB);
        });
        return result;
    }

    private static FeatureMatch? BestInWindow(int i, in Descriptor256 da, Keypoint ka, ReadOnlySpan<Descriptor256> descriptorsB,
        ReadOnlySpan<Keypoint> keypointsB, Dictionary<(int, int), List<int>> grid, in Transform2D aToB, GuidedMatchOptions o)
    {
        if (aToB.W(ka.X, ka.Y) <= 0 || !aToB.TryApply(ka.X, ka.Y, out double px, out double py)
            || !aToB.TryApply(ka.X + 1, ka.Y, out double qx, out double qy) || !aToB.TryApply(ka.X, ka.Y + 1, out double sx, out double sy))
        {
            return null;
        }
        double localScale = Math.Sqrt(Math.Abs((qx - px) * (sy - py) - (sx - px) * (qy - py)));
        double expected = ka.Scale * localScale;
        double r = o.Radius, r2 = r * r;
        int cx = (int)Math.Floor(px / r), cy = (int)Math.Floor(py / r);
        int best = -1, bestD = int.MaxValue;
        Span<int> near = stackalloc int[64];
        int count = 0;
        for (int gy = cy - 1; gy <= cy + 1; gy++)
        {
            for (int gx = cx - 1; gx <= cx + 1; gx++)
            {
                if (!grid.TryGetValue((gx, gy), out var list))
                {
                    continue;
                }
                foreach (int j in list)
                {
                    var kb = keypointsB[j];
                    double dx = kb.X - px, dy = kb.Y - py, ratio = kb.Scale / expected;
                    if (dx * dx + dy * dy > r2 || ratio > o.MaxScaleRatio || ratio * o.MaxScaleRatio < 1 || count == near.Length)
                    {
                        continue;
                    }
                    near[count++] = j;
                    int d = Descriptor256.Hamming(da, descriptorsB[j]);
                    if (d < bestD || (d == bestD && j < best))
                    {
                        bestD = d;
                        best = j;
                    }
                }
            }
        }
        if (best < 0 || bestD > o.MaxDistance)
        {
            return null;
        }
        int second = Descriptor256.Bits;
        var kbBest = keypointsB[best];
        foreach (int j in near[..count])
        {
            var kb = keypointsB[j];
            double same = o.SameCornerRadius * Math.Max(kb.Scale, kbBest.Scale);
            double dx = kb.X - kbBest.X, dy = kb.Y - kbBest.Y;
            if (j != best && dx * dx + dy * dy > same * same)
            {
                second = Math.Min(second, Descriptor256.Hamming(da, descriptorsB[j]));
            }
        }
        return bestD <= o.MaxRatio * second ? new FeatureMatch(i, best, bestD, second) : null;
    }
}
