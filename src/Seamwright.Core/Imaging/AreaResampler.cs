using System.Buffers;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace Seamwright.Core.Imaging;

/// <summary>
/// Downscaling by exact area averaging (a box filter as wide as one output pixel, with
/// fractional coverage at the borders), which is the anti-aliasing filter matched to the
/// pixel-as-area model. Separable; memory is one output row of floats plus one weight table
/// per axis. Output pixels that would only be partly covered by the source are dropped, so the
/// scale is exact and the same on both axes (see <see cref="ScaledImage"/>).
/// </summary>
public static class AreaResampler
{
    /// <summary>
    /// Downscales so that the result has at most <paramref name="maxPixels"/> pixels. Returns the
    /// very same image with scale 1 when it already fits.
    /// </summary>
    public static ScaledImage ToPixelBudget(GrayImage source, long maxPixels)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(maxPixels);
        long pixels = (long)source.Width * source.Height;
        if (pixels <= maxPixels)
        {
            return new ScaledImage(source, 1.0);
        }
        double scale = Math.Sqrt((double)pixels / maxPixels);
        // Guard against rounding leaving one pixel too many.
        while ((long)OutputLength(source.Width, scale) * OutputLength(source.Height, scale) > maxPixels)
        {
            scale *= 1.0 + 1e-9;
        }
        return Downscale(source, scale);
    }

    /// <summary>Output length for a source length and scale (at least 1).</summary>
    public static int OutputLength(int sourceLength, double scale) =>
        Math.Max(1, (int)Math.Floor(sourceLength / scale + 1e-9));

    /// <summary>Downscales by <paramref name="scale"/> (source pixels per output pixel, at least 1).</summary>
    public static ScaledImage Downscale(GrayImage source, double scale)
    {
        ArgumentNullException.ThrowIfNull(source);
        if (!double.IsFinite(scale) || scale < 1.0)
        {
            throw new ArgumentOutOfRangeException(nameof(scale), scale, "The scale must be a finite number of at least 1.");
        }
        if (scale == 1.0)
        {
            return new ScaledImage(source, 1.0);
        }
        int outW = OutputLength(source.Width, scale);
        int outH = OutputLength(source.Height, scale);
        var wx = BoxWeights.Create(source.Width, outW, scale);
        var wy = BoxWeights.Create(source.Height, outH, scale);
        var result = new GrayImage(outW, outH);
        // Horizontally filtered source rows, each computed once: slot j % slots holds source row j.
        int slots = wy.MaxCount + 1;
        float[] filtered = ArrayPool<float>.Shared.Rent(slots * outW);
        float[] floats = ArrayPool<float>.Shared.Rent(source.Width);
        float[] accBuffer = ArrayPool<float>.Shared.Rent(outW);
        var slotRow = new int[slots];
        Array.Fill(slotRow, -1);
        try
        {
            Span<float> acc = accBuffer.AsSpan(0, outW);
            for (int yo = 0; yo < outH; yo++)
            {
                acc.Clear();
                int start = wy.Start[yo];
                int count = wy.Count[yo];
                int offset = wy.Offset[yo];
                for (int k = 0; k < count; k++)
                {
                    int j = start + k, slot = j % slots;
                    var row = filtered.AsSpan(slot * outW, outW);
                    if (slotRow[slot] != j)
                    {
                        FilterRow(source.Row(j), floats, wx, row);
                        slotRow[slot] = j;
                    }
                    MultiplyAdd(acc, row, wy.Weights[offset + k]);
                }
                StoreBytes(acc, result.Row(yo));
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(filtered);
            ArrayPool<float>.Shared.Return(floats);
            ArrayPool<float>.Shared.Return(accBuffer);
        }
        return new ScaledImage(result, scale);
    }

    /// <summary>acc[x] += weight * row[x] (a product, then a sum: the same arithmetic on every path).</summary>
    private static void MultiplyAdd(Span<float> acc, ReadOnlySpan<float> row, float weight)
    {
        int x = 0;
        if (Vector256.IsHardwareAccelerated)
        {
            var vw = Vector256.Create(weight);
            ref float a0 = ref MemoryMarshal.GetReference(acc);
            ref float r0 = ref MemoryMarshal.GetReference(row);
            for (; x + Vector256<float>.Count <= acc.Length; x += Vector256<float>.Count)
            {
                (Vector256.LoadUnsafe(ref a0, (nuint)x) + vw * Vector256.LoadUnsafe(ref r0, (nuint)x)).StoreUnsafe(ref a0, (nuint)x);
            }
        }
        for (; x < acc.Length; x++)
        {
            acc[x] += weight * row[x];
        }
    }

    /// <summary>ToByte of every value.</summary>
    private static void StoreBytes(ReadOnlySpan<float> values, Span<byte> dst)
    {
        int x = 0;
        if (Vector256.IsHardwareAccelerated)
        {
            var zero = Vector256<float>.Zero;
            var max = Vector256.Create(255f);
            var half = Vector256.Create(0.5f);
            ref float v0 = ref MemoryMarshal.GetReference(values);
            int step = 4 * Vector256<float>.Count;
            for (; x + step <= dst.Length; x += step)
            {
                var i0 = Vector256.ConvertToInt32(Vector256.Min(Vector256.Max(Vector256.LoadUnsafe(ref v0, (nuint)x), zero), max) + half);
                var i1 = Vector256.ConvertToInt32(Vector256.Min(Vector256.Max(Vector256.LoadUnsafe(ref v0, (nuint)(x + 8)), zero), max) + half);
                var i2 = Vector256.ConvertToInt32(Vector256.Min(Vector256.Max(Vector256.LoadUnsafe(ref v0, (nuint)(x + 16)), zero), max) + half);
                var i3 = Vector256.ConvertToInt32(Vector256.Min(Vector256.Max(Vector256.LoadUnsafe(ref v0, (nuint)(x + 24)), zero), max) + half);
                var bytes = Vector256.Narrow(Vector256.Narrow(i0, i1), Vector256.Narrow(i2, i3));
                bytes.AsByte().StoreUnsafe(ref MemoryMarshal.GetReference(dst), (nuint)x);
            }
        }
        for (; x < dst.Length; x++)
        {
            dst[x] = ToByte(values[x]);
        }
    }

    /// <summary>
    /// One source row filtered horizontally: dst[xo] = sum over the taps of weight * pixel, added in
    /// tap order from zero. The padded taps of shorter outputs have weight 0 and add exactly nothing.
    /// </summary>
    private static void FilterRow(ReadOnlySpan<byte> src, float[] floats, BoxWeights w, Span<float> dst)
    {
        int n = dst.Length, taps = w.MaxCount;
        int xo = 0;
        if (Avx2.IsSupported)
        {
            for (int x = 0; x < src.Length; x++)
            {
                floats[x] = src[x];
            }
            unsafe
            {
                fixed (float* f = floats)
                fixed (int* index = w.TapIndex)
                fixed (float* weight = w.TapWeight)
                {
                    for (; xo + Vector256<float>.Count <= n; xo += Vector256<float>.Count)
                    {
                        var sum = Vector256<float>.Zero;
                        for (int k = 0; k < taps; k++)
                        {
                            var idx = Avx.LoadVector256(index + k * n + xo);
                            sum += Avx.LoadVector256(weight + k * n + xo) * Avx2.GatherVector256(f, idx, 4);
                        }
                        sum.StoreUnsafe(ref MemoryMarshal.GetReference(dst), (nuint)xo);
                    }
                }
            }
        }
        for (; xo < n; xo++)
        {
            float sum = 0;
            for (int k = 0; k < taps; k++)
            {
                sum += w.TapWeight[k * n + xo] * src[w.TapIndex[k * n + xo]];
            }
            dst[xo] = sum;
        }
    }

    internal static byte ToByte(float v) => v <= 0 ? (byte)0 : v >= 255 ? (byte)255 : (byte)(v + 0.5f);

    /// <summary>Per output index: the first source index, the tap count and the normalised weights.</summary>
    private sealed class BoxWeights
    {
        private BoxWeights(int[] start, int[] count, int[] offset, float[] weights)
        {
            Start = start;
            Count = count;
            Offset = offset;
            Weights = weights;
            int n = start.Length;
            MaxCount = count.Max();
            TapIndex = new int[MaxCount * n];
            TapWeight = new float[MaxCount * n];
            for (int i = 0; i < n; i++)
            {
                for (int k = 0; k < MaxCount; k++)
                {
                    TapIndex[k * n + i] = k < count[i] ? start[i] + k : start[i];
                    TapWeight[k * n + i] = k < count[i] ? weights[offset[i] + k] : 0f;
                }
            }
        }

        public int[] Start { get; }

        public int[] Count { get; }

        public int[] Offset { get; }

        public float[] Weights { get; }

        /// <summary>Most taps of any output.</summary>
        public int MaxCount { get; }

        /// <summary>Tap-major tables, MaxCount x outputs: source index and weight of tap k of output i at k * outputs + i (weight 0 past Count).</summary>
        public int[] TapIndex { get; }

        public float[] TapWeight { get; }

        public static BoxWeights Create(int sourceLength, int outputLength, double scale)
        {
            var start = new int[outputLength];
            var count = new int[outputLength];
            var offset = new int[outputLength];
            var weights = new List<float>(outputLength * ((int)Math.Ceiling(scale) + 1));
            for (int i = 0; i < outputLength; i++)
            {
                double a = i * scale;
                double b = Math.Min((i + 1) * scale, sourceLength);
                int j0 = Math.Min((int)Math.Floor(a), sourceLength - 1);
                int j1 = Math.Max(j0, Math.Min((int)Math.Ceiling(b) - 1, sourceLength - 1));
                start[i] = j0;
                offset[i] = weights.Count;
                double total = 0;
                int first = weights.Count;
                for (int j = j0; j <= j1; j++)
                {
                    double overlap = Math.Min(b, j + 1) - Math.Max(a, j);
                    weights.Add((float)Math.Max(0, overlap));
                    total += Math.Max(0, overlap);
                }
                for (int k = first; k < weights.Count; k++)
                {
                    weights[k] = (float)(weights[k] / total);
                }
                count[i] = j1 - j0 + 1;
            }
            return new BoxWeights(start, count, offset, [.. weights]);
        }
    }
}
