using System.Buffers;

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
        float[] rowBuffer = ArrayPool<float>.Shared.Rent(outW);
        float[] accBuffer = ArrayPool<float>.Shared.Rent(outW);
        try
        {
            Span<float> row = rowBuffer.AsSpan(0, outW);
            Span<float> acc = accBuffer.AsSpan(0, outW);
            for (int yo = 0; yo < outH; yo++)
            {
                acc.Clear();
                int start = wy.Start[yo];
                int count = wy.Count[yo];
                int offset = wy.Offset[yo];
                for (int k = 0; k < count; k++)
                {
                    FilterRow(source.Row(start + k), wx, row);
                    float w = wy.Weights[offset + k];
                    for (int x = 0; x < outW; x++)
                    {
                        acc[x] += w * row[x];
                    }
                }
                Span<byte> dst = result.Row(yo);
                for (int x = 0; x < outW; x++)
                {
                    dst[x] = ToByte(acc[x]);
                }
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(rowBuffer);
            ArrayPool<float>.Shared.Return(accBuffer);
        }
        return new ScaledImage(result, scale);
    }

    private static void FilterRow(ReadOnlySpan<byte> src, BoxWeights w, Span<float> dst)
    {
        for (int xo = 0; xo < dst.Length; xo++)
        {
            int start = w.Start[xo];
            int count = w.Count[xo];
            int offset = w.Offset[xo];
            float sum = 0;
            for (int k = 0; k < count; k++)
            {
                sum += w.Weights[offset + k] * src[start + k];
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
        }

        public int[] Start { get; }

        public int[] Count { get; }

        public int[] Offset { get; }

        public float[] Weights { get; }

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
