using System.Buffers;
using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using Seamwright.Core.Features;

namespace Seamwright.Core.Matching;

/// <summary>
/// The all-pairs Hamming pass of <see cref="HammingMatcher"/>: for every descriptor of A its three
/// nearest descriptors of B (ties keep the lower index), and for every descriptor of B its nearest
/// A (ties keep the lower index). With AVX-512 BW or AVX2 the distances of 8 or 4 descriptors of B
/// are computed at once: B is stored word-major per block (word k of the block's descriptors
/// side by side), each XOR is counted by the nibble lookup (vpshufb) and the byte counts are summed
/// per descriptor by vpsadbw (Mula, Kurz, Lemire, "Faster population counts using AVX2
/// instructions", The Computer Journal 61(1), 2018). A block whose distances are all at least A's
/// current third best is skipped; otherwise its lanes go through the scalar update in index order,
/// so the results are identical to the scalar pass (<c>HammingScanTests</c> compares them).
/// </summary>
internal static class HammingScan
{
    /// <summary>Which instruction set the pass may use (tests force the scalar pass to compare).</summary>
    internal enum Path { Best, Scalar }

    public static void Run(ReadOnlySpan<Descriptor256> a, ReadOnlySpan<Descriptor256> b, Span<(int D, int J)> top, Span<int> bBest,
        Span<int> bBestIndex, Path path = Path.Best)
    {
        bBest.Fill(int.MaxValue);
        int lanes = path == Path.Scalar ? 0 : Avx512BW.IsSupported ? 8 : Avx2.IsSupported ? 4 : 0;
        int blocks = lanes == 0 ? 0 : b.Length / lanes;
        int vectorEnd = blocks * lanes;
        // Pooled: a pair's buffers (about 200 KB for 4000 features) would otherwise land on the large-object heap every pair.
        ulong[] soa = ArrayPool<ulong>.Shared.Rent(blocks * lanes * 4);
        long[] best = ArrayPool<long>.Shared.Rent(vectorEnd);
        long[] bestIndex = ArrayPool<long>.Shared.Rent(vectorEnd);
        try
        {
            WordMajor(b, lanes, blocks, soa);
            best.AsSpan(0, vectorEnd).Fill(long.MaxValue);
            Rows(a, b, top, bBest, bBestIndex, lanes, blocks, soa, best, bestIndex);
        }
        finally
        {
            ArrayPool<ulong>.Shared.Return(soa);
            ArrayPool<long>.Shared.Return(best);
            ArrayPool<long>.Shared.Return(bestIndex);
        }
    }

    private static void Rows(ReadOnlySpan<Descriptor256> a, ReadOnlySpan<Descriptor256> b, Span<(int D, int J)> top, Span<int> bBest,
        Span<int> bBestIndex, int lanes, int blocks, ulong[] soa, long[] best, long[] bestIndex)
    {
        int vectorEnd = blocks * lanes;
        for (int i = 0; i < a.Length; i++)
        {
            var row = new Row(a[i]);
            if (lanes == 8)
            {
                Blocks512(ref row, i, soa, blocks, best, bestIndex);
            }
            else if (lanes == 4)
            {
                Blocks256(ref row, i, soa, blocks, best, bestIndex);
            }
            Scalar(ref row, i, b, vectorEnd, bBest, bBestIndex);
            top[3 * i] = (row.D1, row.J1);
            top[3 * i + 1] = (row.D2, row.J2);
            top[3 * i + 2] = (row.D3, row.J3);
        }
        for (int j = 0; j < vectorEnd; j++)
        {
            bBest[j] = (int)best[j];
            bBestIndex[j] = (int)bestIndex[j];
        }
    }

    /// <summary>One descriptor of A and its three best distances so far.</summary>
    private struct Row(Descriptor256 d)
    {
        public readonly ulong W0 = d.W0, W1 = d.W1, W2 = d.W2, W3 = d.W3;
        public int D1 = int.MaxValue, D2 = int.MaxValue, D3 = int.MaxValue, J1 = -1, J2 = -1, J3 = -1;

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public void Offer(int d, int j)
        {
            if (d < D3)
            {
                if (d < D2)
                {
                    D3 = D2;
                    J3 = J2;
                    if (d < D1)
                    {
                        D2 = D1;
                        J2 = J1;
                        D1 = d;
                        J1 = j;
                    }
                    else
                    {
                        D2 = d;
                        J2 = j;
                    }
                }
                else
                {
                    D3 = d;
                    J3 = j;
                }
            }
        }
    }

    private static void Scalar(ref Row row, int i, ReadOnlySpan<Descriptor256> b, int from, Span<int> bBest, Span<int> bBestIndex)
    {
        ref ulong words = ref Unsafe.As<Descriptor256, ulong>(ref MemoryMarshal.GetReference(b));
        for (int j = from; j < b.Length; j++)
        {
            ref ulong q = ref Unsafe.Add(ref words, 4 * j);
            int d = BitOperations.PopCount(row.W0 ^ q) + BitOperations.PopCount(row.W1 ^ Unsafe.Add(ref q, 1))
                + BitOperations.PopCount(row.W2 ^ Unsafe.Add(ref q, 2)) + BitOperations.PopCount(row.W3 ^ Unsafe.Add(ref q, 3));
            row.Offer(d, j);
            if (d < bBest[j])
            {
                bBest[j] = d;
                bBestIndex[j] = i;
            }
        }
    }

    /// <summary>B's first <c>blocks x lanes</c> descriptors, block by block, word k of the block's descriptors side by side.</summary>
    private static void WordMajor(ReadOnlySpan<Descriptor256> b, int lanes, int blocks, ulong[] soa)
    {
        for (int q = 0; q < blocks; q++)
        {
            for (int l = 0; l < lanes; l++)
            {
                var d = b[q * lanes + l];
                int o = q * lanes * 4 + l;
                soa[o] = d.W0;
                soa[o + lanes] = d.W1;
                soa[o + 2 * lanes] = d.W2;
                soa[o + 3 * lanes] = d.W3;
            }
        }
    }

    private static void Blocks512(ref Row row, int i, ulong[] soa, int blocks, long[] best, long[] bestIndex)
    {
        var lut = Vector512.Create((byte)0, 1, 1, 2, 1, 2, 2, 3, 1, 2, 2, 3, 2, 3, 3, 4, 0, 1, 1, 2, 1, 2, 2, 3, 1, 2, 2, 3, 2, 3, 3, 4,
            0, 1, 1, 2, 1, 2, 2, 3, 1, 2, 2, 3, 2, 3, 3, 4, 0, 1, 1, 2, 1, 2, 2, 3, 1, 2, 2, 3, 2, 3, 3, 4);
        var nibble = Vector512.Create((byte)0x0F);
        Vector512<ulong> a0 = Vector512.Create(row.W0), a1 = Vector512.Create(row.W1), a2 = Vector512.Create(row.W2), a3 = Vector512.Create(row.W3);
        var self = Vector512.Create((long)i);
        ref ulong s = ref MemoryMarshal.GetArrayDataReference(soa);
        ref long bb = ref MemoryMarshal.GetArrayDataReference(best);
        ref long bi = ref MemoryMarshal.GetArrayDataReference(bestIndex);
        for (int q = 0; q < blocks; q++)
        {
            ref ulong w = ref Unsafe.Add(ref s, 32 * q);
            var c = Count512(Vector512.LoadUnsafe(ref w) ^ a0, lut, nibble) + Count512(Vector512.LoadUnsafe(ref w, 8) ^ a1, lut, nibble)
                + Count512(Vector512.LoadUnsafe(ref w, 16) ^ a2, lut, nibble) + Count512(Vector512.LoadUnsafe(ref w, 24) ^ a3, lut, nibble);
            var d = Avx512BW.SumAbsoluteDifferences(c, Vector512<byte>.Zero).AsInt64();
            if (Vector512.LessThan(d, Vector512.Create((long)row.D3)).ExtractMostSignificantBits() != 0)
            {
                for (int l = 0; l < 8; l++)
                {
                    row.Offer((int)d.GetElement(l), 8 * q + l);
                }
            }
            ref long bq = ref Unsafe.Add(ref bb, 8 * q);
            var held = Vector512.LoadUnsafe(ref bq);
            var better = Vector512.LessThan(d, held);
            Vector512.ConditionalSelect(better, d, held).StoreUnsafe(ref bq);
            ref long iq = ref Unsafe.Add(ref bi, 8 * q);
            Vector512.ConditionalSelect(better, self, Vector512.LoadUnsafe(ref iq)).StoreUnsafe(ref iq);
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector512<byte> Count512(Vector512<ulong> x, Vector512<byte> lut, Vector512<byte> nibble)
    {
        var bytes = x.AsByte();
        var high = Avx512BW.ShiftRightLogical(x.AsUInt16(), 4).AsByte();
        return Avx512BW.Shuffle(lut, bytes & nibble) + Avx512BW.Shuffle(lut, high & nibble);
    }

    private static void Blocks256(ref Row row, int i, ulong[] soa, int blocks, long[] best, long[] bestIndex)
    {
        var lut = Vector256.Create((byte)0, 1, 1, 2, 1, 2, 2, 3, 1, 2, 2, 3, 2, 3, 3, 4, 0, 1, 1, 2, 1, 2, 2, 3, 1, 2, 2, 3, 2, 3, 3, 4);
        var nibble = Vector256.Create((byte)0x0F);
        Vector256<ulong> a0 = Vector256.Create(row.W0), a1 = Vector256.Create(row.W1), a2 = Vector256.Create(row.W2), a3 = Vector256.Create(row.W3);
        var self = Vector256.Create((long)i);
        ref ulong s = ref MemoryMarshal.GetArrayDataReference(soa);
        ref long bb = ref MemoryMarshal.GetArrayDataReference(best);
        ref long bi = ref MemoryMarshal.GetArrayDataReference(bestIndex);
        for (int q = 0; q < blocks; q++)
        {
            ref ulong w = ref Unsafe.Add(ref s, 16 * q);
            var c = Count256(Vector256.LoadUnsafe(ref w) ^ a0, lut, nibble) + Count256(Vector256.LoadUnsafe(ref w, 4) ^ a1, lut, nibble)
                + Count256(Vector256.LoadUnsafe(ref w, 8) ^ a2, lut, nibble) + Count256(Vector256.LoadUnsafe(ref w, 12) ^ a3, lut, nibble);
            var d = Avx2.SumAbsoluteDifferences(c, Vector256<byte>.Zero).AsInt64();
            if (Vector256.LessThan(d, Vector256.Create((long)row.D3)).ExtractMostSignificantBits() != 0)
            {
                for (int l = 0; l < 4; l++)
                {
                    row.Offer((int)d.GetElement(l), 4 * q + l);
                }
            }
            ref long bq = ref Unsafe.Add(ref bb, 4 * q);
            var held = Vector256.LoadUnsafe(ref bq);
            var better = Vector256.LessThan(d, held);
            Vector256.ConditionalSelect(better, d, held).StoreUnsafe(ref bq);
            ref long iq = ref Unsafe.Add(ref bi, 4 * q);
            Vector256.ConditionalSelect(better, self, Vector256.LoadUnsafe(ref iq)).StoreUnsafe(ref iq);
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector256<byte> Count256(Vector256<ulong> x, Vector256<byte> lut, Vector256<byte> nibble)
    {
        var bytes = x.AsByte();
        var high = Avx2.ShiftRightLogical(x.AsUInt16(), 4).AsByte();
        return Avx2.Shuffle(lut, bytes & nibble) + Avx2.Shuffle(lut, high & nibble);
    }
}
