using System.Buffers;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Features;

/// <summary>
/// Downscaling by exact area averaging (each output pixel is the coverage-weighted mean of the
/// input pixels under it), separable, for any factor of at least 1. Output pixel i covers input
/// [i * s, (i + 1) * s) in edge coordinates, so with pixel centres at integers an output point x
/// maps to the input point (x + 0.5) * s - 0.5.
/// </summary>
internal static class AreaResampler
{
    public static GrayImage Downscale(GrayImage src, int dstWidth, int dstHeight)
    {
        if (dstWidth == src.Width && dstHeight == src.Height)
        {
            return new GrayImage(src.Width, src.Height, (byte[])src.Pixels.Clone());
        }
        if (dstWidth > src.Width || dstHeight > src.Height || dstWidth < 1 || dstHeight < 1)
        {
            throw new ArgumentOutOfRangeException(nameof(dstWidth), "Area resampling only shrinks.");
        }
        var (xStart, xWeights, xTaps) = Weights(src.Width, dstWidth);
        var (yStart, yWeights, yTaps) = Weights(src.Height, dstHeight);
        int sw = src.Width;
        float[] rows = ArrayPool<float>.Shared.Rent(dstWidth * src.Height);
        try
        {
            var pixels = src.Pixels;
            for (int y = 0; y < src.Height; y++)
            {
                int o = y * sw;
                int d = y * dstWidth;
                for (int x = 0; x < dstWidth; x++)
                {
                    int s0 = xStart[x];
                    int wi = x * xTaps;
                    float acc = 0;
                    for (int k = 0; k < xTaps; k++)
                    {
                        float wk = xWeights[wi + k];
                        if (wk != 0)
                        {
                            acc += wk * pixels[o + s0 + k];
                        }
                    }
                    rows[d + x] = acc;
                }
            }
            var dst = new GrayImage(dstWidth, dstHeight);
            var output = dst.Pixels;
            float[] acc2 = new float[dstWidth];
            for (int y = 0; y < dstHeight; y++)
            {
                Array.Clear(acc2);
                int s0 = yStart[y];
                for (int k = 0; k < yTaps; k++)
                {
                    float wk = yWeights[y * yTaps + k];
                    if (wk == 0)
                    {
                        continue;
                    }
                    var row = rows.AsSpan((s0 + k) * dstWidth, dstWidth);
                    for (int x = 0; x < dstWidth; x++)
                    {
                        acc2[x] += wk * row[x];
                    }
                }
                int d = y * dstWidth;
                for (int x = 0; x < dstWidth; x++)
                {
                    output[d + x] = (byte)Math.Clamp((int)(acc2[x] + 0.5f), 0, 255);
                }
            }
            return dst;
        }
        finally
        {
            ArrayPool<float>.Shared.Return(rows);
        }
    }

    private static (int[] Start, float[] Weights, int Taps) Weights(int srcLength, int dstLength)
    {
        double s = (double)srcLength / dstLength;
        int taps = (int)Math.Ceiling(s) + 1;
        var start = new int[dstLength];
        var weights = new float[dstLength * taps];
        for (int i = 0; i < dstLength; i++)
        {
            double a = i * s, b = Math.Min((i + 1) * s, srcLength);
            int first = (int)Math.Floor(a);
            start[i] = first;
            for (int k = 0; k < taps && first + k < srcLength; k++)
            {
                double lo = Math.Max(a, first + k), hi = Math.Min(b, first + k + 1);
                if (hi > lo)
                {
                    weights[i * taps + k] = (float)((hi - lo) / s);
                }
            }
        }
        return (start, weights, taps);
    }
}
