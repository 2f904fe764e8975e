using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using Seamwright.Core.Features;

namespace Seamwright.Core.Matching;

/// <summary>
/// Brute-force nearest neighbours in Hamming distance, with the ratio test (Lowe, IJCV 2004) and an
/// optional mutual check, in one pass over all pairs (A's two best and B's best are tracked together).
/// </summary>
public static class HammingMatcher
{
    public static MatchResult Match(ReadOnlySpan<Descriptor256> a, ReadOnlySpan<Descriptor256> b, MatchOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        int na = a.Length, nb = b.Length;
        if (na == 0 || nb == 0)
        {
            return new MatchResult([], 0);
        }
        var best = new int[na];
        var bestIndex = new int[na];
        var second = new int[na];
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
            int d1 = int.MaxValue, d2 = int.MaxValue, j1 = -1;
            for (int j = 0; j < nb; j++)
            {
                ref ulong q = ref Unsafe.Add(ref words, 4 * j);
                int d = BitOperations.PopCount(a0 ^ q) + BitOperations.PopCount(a1 ^ Unsafe.Add(ref q, 1))
                    + BitOperations.PopCount(a2 ^ Unsafe.Add(ref q, 2)) + BitOperations.PopCount(a3 ^ Unsafe.Add(ref q, 3));
                if (d < d2)
                {
                    if (d < d1)
                    {
                        d2 = d1;
                        d1 = d;
                        j1 = j;
                    }
                    else
                    {
                        d2 = d;
                    }
                }
                ref int bb = ref Unsafe.Add(ref bBestRef, j);
                if (d < bb)
                {
                    bb = d;
                    Unsafe.Add(ref bBestIndexRef, j) = i;
                }
            }
            best[i] = d1;
            bestIndex[i] = j1;
            second[i] = d2 == int.MaxValue ? Descriptor256.Bits : d2;
        }
        var matches = new List<FeatureMatch>();
        int ambiguous = 0;
        for (int i = 0; i < na; i++)
        {
            int j = bestIndex[i];
            if (best[i] > options.MaxDistance)
            {
                continue;
            }
            if (best[i] > options.MaxRatio * second[i])
            {
                ambiguous++;
                continue;
            }
            if (options.Mutual && bBestIndex[j] != i)
            {
                continue;
            }
            matches.Add(new FeatureMatch(i, j, best[i], second[i]));
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
}
