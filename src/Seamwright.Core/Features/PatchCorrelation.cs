using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace Seamwright.Core.Features;

/// <summary>
/// A re-localisation template: the anchor's zero-mean samples, their energy, and where each sample
/// falls in the other patch (patch pixel coordinates, before a correction), with the bounds of those
/// positions. Built once per tie point by <see cref="TiePointRelocalizer"/>.
/// </summary>
internal readonly ref struct CorrelationTemplate(ReadOnlySpan<float> values, double energy, ReadOnlySpan<float> qx, ReadOnlySpan<float> qy,
    float minX, float maxX, float minY, float maxY)
{
    public ReadOnlySpan<float> Values { get; } = values;

    public double Energy { get; } = energy;

    public ReadOnlySpan<float> Qx { get; } = qx;

    public ReadOnlySpan<float> Qy { get; } = qy;

    public float MinX { get; } = minX;

    public float MaxX { get; } = maxX;

    public float MinY { get; } = minY;

    public float MaxY { get; } = maxY;
}

/// <summary>
/// Normalised cross-correlation of a template with the other patch sampled bilinearly at up to
/// <see cref="MaxOffsets"/> corrections at once. With AVX2 the corrections are the vector lanes: each
/// template sample is interpolated at every correction together (two gathers of four bytes bring the
/// four neighbours), and the sums run per lane in double precision, sample by sample in template order,
/// so every lane performs exactly the operations of the scalar loop in the same order and the results
/// are bit-identical to it (<c>PatchCorrelationTests</c> compares them). Batching the corrections is what
/// pays: the scalar loop is bound by its three chains of dependent double additions, one correction at a time.
/// </summary>
internal static class PatchCorrelation
{
    /// <summary>Most corrections per call (the lanes of one vector of single-precision values).</summary>
    public const int MaxOffsets = 8;

    /// <summary>Which instruction set the correlation may use (tests force the scalar path to compare).</summary>
    internal enum Path { Best, Scalar }

    /// <summary>
    /// results[k] = correlation of the template with the other patch shifted by (dx[k], dy[k]) pixels;
    /// 0 when the sampled values are (nearly) constant.
    /// </summary>
    public static void Correlate(in CorrelationTemplate t, ReadOnlySpan<float> dx, ReadOnlySpan<float> dy, FullResolutionPatch other,
        Span<double> results, Path path = Path.Best)
    {
        int m = dx.Length;
        if (m == 0 || m > MaxOffsets || dy.Length != m || results.Length < m)
        {
            throw new ArgumentException($"Between 1 and {MaxOffsets} corrections, each with both coordinates and a result.");
        }
        if (path == Path.Best && UsesLanes(t, dx, dy, other))
        {
            Lanes(t, dx, dy, other, results);
            return;
        }
        for (int k = 0; k < m; k++)
        {
            results[k] = Scalar(t, dx[k], dy[k], other);
        }
    }

    /// <summary>Whether <see cref="Correlate"/> takes the vector path for these corrections (tests check they exercise it).</summary>
    internal static bool UsesLanes(in CorrelationTemplate t, ReadOnlySpan<float> dx, ReadOnlySpan<float> dy, FullResolutionPatch other) =>
        Avx2.IsSupported && InBounds(t, dx, dy, other);

    /// <summary>One correction, sample by sample (the definition).</summary>
    public static double Scalar(in CorrelationTemplate t, float dx, float dy, FullResolutionPatch other)
    {
        var p = other.Pixels;
        int side = other.Side;
        var template = t.Values;
        var qx = t.Qx;
        var qy = t.Qy;
        double sum = 0, sum2 = 0, cross = 0;
        int n = template.Length;
        for (int i = 0; i < n; i++)
        {
            float x = qx[i] + dx, y = qy[i] + dy;
            int x0 = (int)x, y0 = (int)y;
            float fx = x - x0, fy = y - y0;
            int o = y0 * side + x0;
            float top = p[o] + fx * (p[o + 1] - p[o]);
            float bottom = p[o + side] + fx * (p[o + side + 1] - p[o + side]);
            float s = top + fy * (bottom - top);
            sum += s;
            sum2 += s * s;
            cross += template[i] * s;
        }
        return Finish(sum, sum2, cross, n, t.Energy);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double Finish(double sum, double sum2, double cross, int n, double energy)
    {
        double variance = sum2 - sum * sum / n;
        return variance > 1e-9 ? cross / Math.Sqrt(energy * variance) : 0;
    }

    /// <summary>
    /// Whether every sample at every correction reads inside the other patch's pixels, including the two
    /// extra bytes a four-byte gather brings beyond the lower right neighbour. Rounding and truncation are
    /// monotonic, so the extreme positions bound every index. Otherwise the scalar loop runs (and fails
    /// exactly as it always did on an index outside the patch).
    /// </summary>
    private static bool InBounds(in CorrelationTemplate t, ReadOnlySpan<float> dx, ReadOnlySpan<float> dy, FullResolutionPatch other)
    {
        float loDx = dx[0], hiDx = dx[0], loDy = dy[0], hiDy = dy[0];
        for (int k = 1; k < dx.Length; k++)
        {
            loDx = Math.Min(loDx, dx[k]);
            hiDx = Math.Max(hiDx, dx[k]);
            loDy = Math.Min(loDy, dy[k]);
            hiDy = Math.Max(hiDy, dy[k]);
        }
        float x0 = t.MinX + loDx, x1 = t.MaxX + hiDx, y0 = t.MinY + loDy, y1 = t.MaxY + hiDy;
        if (!(x0 >= 0 && y0 >= 0 && x1 < other.Side && y1 < other.Side))
        {
            return false;
        }
        long lowest = (long)(int)y0 * other.Side + (int)x0;
        long highest = (long)(int)y1 * other.Side + (int)x1 + other.Side + 3;
        return lowest >= 0 && highest < other.Pixels.Length;
    }

    private static unsafe void Lanes(in CorrelationTemplate t, ReadOnlySpan<float> dx, ReadOnlySpan<float> dy, FullResolutionPatch other,
        Span<double> results)
    {
        int m = dx.Length;
        // Unused lanes repeat the first correction, so they read inside the checked bounds too.
        Span<float> ox = stackalloc float[MaxOffsets];
        Span<float> oy = stackalloc float[MaxOffsets];
        ox.Fill(dx[0]);
        oy.Fill(dy[0]);
        dx.CopyTo(ox);
        dy.CopyTo(oy);
        var vdx = Vector256.Create<float>(ox);
        var vdy = Vector256.Create<float>(oy);
        var side = Vector256.Create(other.Side);
        var low = Vector256.Create(0xFF);
        var sumLo = Vector256<double>.Zero;
        var sumHi = Vector256<double>.Zero;
        var sum2Lo = Vector256<double>.Zero;
        var sum2Hi = Vector256<double>.Zero;
        var crossLo = Vector256<double>.Zero;
        var crossHi = Vector256<double>.Zero;
        int n = t.Values.Length;
        ref float tv = ref MemoryMarshal.GetReference(t.Values);
        ref float qx = ref MemoryMarshal.GetReference(t.Qx);
        ref float qy = ref MemoryMarshal.GetReference(t.Qy);
        fixed (byte* pixels = other.Pixels)
        {
            int* basePointer = (int*)pixels;
            for (int i = 0; i < n; i++)
            {
                var x = Vector256.Create(Unsafe.Add(ref qx, i)) + vdx;
                var y = Vector256.Create(Unsafe.Add(ref qy, i)) + vdy;
                var x0 = Avx.ConvertToVector256Int32WithTruncation(x);
                var y0 = Avx.ConvertToVector256Int32WithTruncation(y);
                var fx = x - Avx.ConvertToVector256Single(x0);
                var fy = y - Avx.ConvertToVector256Single(y0);
                var o = Avx2.MultiplyLow(y0, side) + x0;
                var upper = Avx2.GatherVector256(basePointer, o, 1);
                var lower = Avx2.GatherVector256(basePointer, o + side, 1);
                var p00 = upper & low;
                var p01 = Avx2.ShiftRightLogical(upper, 8) & low;
                var p10 = lower & low;
                var p11 = Avx2.ShiftRightLogical(lower, 8) & low;
                var top = Avx.ConvertToVector256Single(p00) + fx * Avx.ConvertToVector256Single(p01 - p00);
                var bottom = Avx.ConvertToVector256Single(p10) + fx * Avx.ConvertToVector256Single(p11 - p10);
                var s = top + fy * (bottom - top);
                var s2 = s * s;
                var c = Vector256.Create(Unsafe.Add(ref tv, i)) * s;
                sumLo += Avx.ConvertToVector256Double(s.GetLower());
                sumHi += Avx.ConvertToVector256Double(s.GetUpper());
                sum2Lo += Avx.ConvertToVector256Double(s2.GetLower());
                sum2Hi += Avx.ConvertToVector256Double(s2.GetUpper());
                crossLo += Avx.ConvertToVector256Double(c.GetLower());
                crossHi += Avx.ConvertToVector256Double(c.GetUpper());
            }
        }
        for (int k = 0; k < m; k++)
        {
            double sum = k < 4 ? sumLo.GetElement(k) : sumHi.GetElement(k - 4);
            double sum2 = k < 4 ? sum2Lo.GetElement(k) : sum2Hi.GetElement(k - 4);
            double cross = k < 4 ? crossLo.GetElement(k) : crossHi.GetElement(k - 4);
            results[k] = Finish(sum, sum2, cross, n, t.Energy);
        }
    }
}
