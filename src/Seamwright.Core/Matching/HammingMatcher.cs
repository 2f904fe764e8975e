using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using Seamwright.Core.Features;

namespace Seamwright.Core.Matching;

/// <summary>
/// Brute-force nearest neighbours in Hamming distance, with the ratio test (Lowe, IJCV 2004) and an
/// optional mutual check, in one pass over all pairs (A's three best and B's best are tracked together).
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
        bBest.AsSpan().Fill(int.MaxValue);
        ref ulong words = ref Unsafe.As<Descriptor256, ulong>(ref MemoryMarshal.GetReference(b));
        ref int bBestRef = ref MemoryMarshal.GetArrayDataReference(bBest);
        ref int bBestIndexRef = ref MemoryMarshal.GetArrayDataReference(bBestIndex);
        for (int i = 0; i < na; i++)
        {
            var da = a[i];
            ulong a0 = da.W0, a1 = da.W1, a2 = da.W2, a3 = da.W3;
            int d1 = int.MaxValue, d2 = int.MaxValue, d3 = int.MaxValue, j1 = -1, j2 = -1, j3 = -1;
            for (int j = 0; j < nb; j++)
            {
                ref ulong q = ref Unsafe.Add(ref words, 4 * j);
                int d = BitOperations.PopCount(a0 ^ q) + BitOperations.PopCount(a1 ^ Unsafe.Add(ref q, 1))
                    + BitOperations.PopCount(a2 ^ Unsafe.Add(ref q, 2)) + BitOperations.PopCount(a3 ^ Unsafe.Add(ref q, 3));
                if (d < d3)
                {
                    if (d < d2)
                    {
                        d3 = d2;
                        j3 = j2;
                        if (d < d1)
                        {
                            d2 = d1;
                            j2 = j1;
                            d1 = d;
                            j1 = j;
                        }
                        else
                        {
                            d2 = d;
                            j2 = j;
                        }
                    }
                    else
                    {
                        d3 = d;
                        j3 = j;
                    }
                }
                ref int bb = ref Unsafe.Add(ref bBestRef, j);
                if (d < bb)
                {
                    bb = d;
                    Unsafe.Add(ref bBestIndexRef, j) = i;
                }
            }
            top[3 * i] = (d1, j1);
            top[3 * i + 1] = (d2, j2);
            top[3 * i + 2] = (d3, j3);
        }
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
