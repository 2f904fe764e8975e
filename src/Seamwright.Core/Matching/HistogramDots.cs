using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using Seamwright.Core.Features.ScaleSpace;

namespace Seamwright.Core.Matching;

/// <summary>
/// Exact dot products of one gradient-histogram descriptor with every descriptor of a set, for
/// <see cref="HistogramMatcher"/>. The bytes are widened to 16-bit integers once per set; with AVX-512 BW
/// or AVX2 a row of A is held in registers and each descriptor of B costs 4 or 8 multiply-add-adjacent
/// instructions (vpmaddwd: pairs of 16-bit products summed into 32-bit lanes) and one horizontal sum.
/// Every product and sum is an integer (at most 128 x 255^2, below 2^31), so the result is the same
/// on every path; tests force the scalar path to compare.
/// </summary>
internal static class HistogramDots
{
    private const int Length = GradientHistogramDescriptor.Length;

    /// <summary>Which instruction set the products may use (tests force the scalar path to compare).</summary>
    internal enum Path { Best, Scalar }

    /// <summary>The descriptors as 16-bit integers, one after another, and their squared norms.</summary>
    public static (short[] Values, int[] SquaredNorms) Widen(ScaleSpaceFeatureSet set)
    {
        ArgumentNullException.ThrowIfNull(set);
        var values = new short[set.Descriptors.Length];
        var norms = new int[set.Count];
        for (int i = 0; i < set.Count; i++)
        {
            int n = 0;
            for (int k = 0; k < Length; k++)
            {
                byte v = set.Descriptors[i * Length + k];
                values[i * Length + k] = v;
                n += v * v;
            }
            norms[i] = n;
        }
        return (values, norms);
    }

    /// <summary>dots[j] = descriptor <paramref name="row"/> of a . descriptor j of b.</summary>
    public static void Row(short[] a, int row, short[] b, Span<int> dots, Path path = Path.Best)
    {
        var x = a.AsSpan(row * Length, Length);
        if (path == Path.Best && Avx512BW.IsSupported)
        {
            Row512(x, b, dots);
        }
        else if (path == Path.Best && Avx2.IsSupported)
        {
            Row256(x, b, dots);
        }
        else
        {
            for (int j = 0; j < dots.Length; j++)
            {
                var y = b.AsSpan(j * Length, Length);
                int sum = 0;
                for (int k = 0; k < Length; k++)
                {
                    sum += x[k] * y[k];
                }
                dots[j] = sum;
            }
        }
    }

    private static void Row512(ReadOnlySpan<short> x, short[] b, Span<int> dots)
    {
        ref short xr = ref MemoryMarshal.GetReference(x);
        var a0 = Vector512.LoadUnsafe(ref xr);
        var a1 = Vector512.LoadUnsafe(ref xr, 32);
        var a2 = Vector512.LoadUnsafe(ref xr, 64);
        var a3 = Vector512.LoadUnsafe(ref xr, 96);
        ref short br = ref MemoryMarshal.GetArrayDataReference(b);
        for (int j = 0; j < dots.Length; j++)
        {
            ref short y = ref Unsafe.Add(ref br, j * Length);
            var s = Avx512BW.MultiplyAddAdjacent(a0, Vector512.LoadUnsafe(ref y))
                + Avx512BW.MultiplyAddAdjacent(a1, Vector512.LoadUnsafe(ref y, 32))
                + Avx512BW.MultiplyAddAdjacent(a2, Vector512.LoadUnsafe(ref y, 64))
                + Avx512BW.MultiplyAddAdjacent(a3, Vector512.LoadUnsafe(ref y, 96));
            dots[j] = Vector512.Sum(s);
        }
    }

    private static void Row256(ReadOnlySpan<short> x, short[] b, Span<int> dots)
    {
        ref short xr = ref MemoryMarshal.GetReference(x);
        var a0 = Vector256.LoadUnsafe(ref xr);
        var a1 = Vector256.LoadUnsafe(ref xr, 16);
        var a2 = Vector256.LoadUnsafe(ref xr, 32);
        var a3 = Vector256.LoadUnsafe(ref xr, 48);
        var a4 = Vector256.LoadUnsafe(ref xr, 64);
        var a5 = Vector256.LoadUnsafe(ref xr, 80);
        var a6 = Vector256.LoadUnsafe(ref xr, 96);
        var a7 = Vector256.LoadUnsafe(ref xr, 112);
        ref short br = ref MemoryMarshal.GetArrayDataReference(b);
        for (int j = 0; j < dots.Length; j++)
        {
            ref short y = ref Unsafe.Add(ref br, j * Length);
            var s = Avx2.MultiplyAddAdjacent(a0, Vector256.LoadUnsafe(ref y)) + Avx2.MultiplyAddAdjacent(a1, Vector256.LoadUnsafe(ref y, 16))
                + Avx2.MultiplyAddAdjacent(a2, Vector256.LoadUnsafe(ref y, 32)) + Avx2.MultiplyAddAdjacent(a3, Vector256.LoadUnsafe(ref y, 48))
                + Avx2.MultiplyAddAdjacent(a4, Vector256.LoadUnsafe(ref y, 64)) + Avx2.MultiplyAddAdjacent(a5, Vector256.LoadUnsafe(ref y, 80))
                + Avx2.MultiplyAddAdjacent(a6, Vector256.LoadUnsafe(ref y, 96)) + Avx2.MultiplyAddAdjacent(a7, Vector256.LoadUnsafe(ref y, 112));
            dots[j] = Vector256.Sum(s);
        }
    }
}
