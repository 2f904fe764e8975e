using System.Buffers;
using System.Numerics;
using System.Runtime.InteropServices;

namespace Seamwright.Core.Features;

/// <summary>Separable Gaussian smoothing of an 8-bit image with reflecting borders (vertical pass, then horizontal).</summary>
internal static class GaussianSmoother
{
    public static byte[] Smooth(ReadOnlySpan<byte> src, int w, int h, double sigma, int radius)
    {
        var kernel = new float[2 * radius + 1];
        double sum = 0;
        for (int i = -radius; i <= radius; i++)
        {
            sum += kernel[i + radius] = (float)Math.Exp(-i * i / (2 * sigma * sigma));
        }
        for (int i = 0; i < kernel.Length; i++)
        {
            kernel[i] = (float)(kernel[i] / sum);
        }
        int n = w * h, pw = w + 2 * radius;
        float[] image = ArrayPool<float>.Shared.Rent(n);
        float[] padded = ArrayPool<float>.Shared.Rent(pw + Vector<float>.Count);
        float[] row = ArrayPool<float>.Shared.Rent(w + Vector<float>.Count);
        var dst = new byte[n];
        try
        {
            for (int i = 0; i < n; i++)
            {
                image[i] = src[i];
            }
            for (int y = 0; y < h; y++)
            {
                var column = padded.AsSpan(radius, w);
                column.Clear();
                for (int k = -radius; k <= radius; k++)
                {
                    MultiplyAdd(column, image.AsSpan(CornerResponse.Reflect(y + k, h) * w, w), kernel[k + radius]);
                }
                for (int i = 1; i <= radius; i++)
                {
                    padded[radius - i] = padded[radius + CornerResponse.Reflect(-i, w)];
                    padded[radius + w - 1 + i] = padded[radius + CornerResponse.Reflect(w - 1 + i, w)];
                }
                var output = row.AsSpan(0, w);
                output.Clear();
                for (int k = 0; k < kernel.Length; k++)
                {
                    MultiplyAdd(output, padded.AsSpan(k, w), kernel[k]);
                }
                var d = dst.AsSpan(y * w, w);
                for (int x = 0; x < w; x++)
                {
                    d[x] = (byte)(output[x] + 0.5f);
                }
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(image);
            ArrayPool<float>.Shared.Return(padded);
            ArrayPool<float>.Shared.Return(row);
        }
        return dst;
    }

    private static void MultiplyAdd(Span<float> acc, ReadOnlySpan<float> src, float weight)
    {
        int x = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var va = MemoryMarshal.Cast<float, Vector<float>>(acc);
            var vs = MemoryMarshal.Cast<float, Vector<float>>(src);
            var vw = new Vector<float>(weight);
            for (int i = 0; i < va.Length; i++)
            {
                va[i] += vs[i] * vw;
            }
            x = va.Length * Vector<float>.Count;
        }
        for (; x < acc.Length; x++)
        {
            acc[x] += src[x] * weight;
        }
    }
}
