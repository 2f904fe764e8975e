using System.Buffers;

namespace Seamwright.Core.Features;

/// <summary>Separable Gaussian smoothing of an 8-bit image with reflecting borders.</summary>
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
        float[] tmp = ArrayPool<float>.Shared.Rent(w * h);
        var dst = new byte[w * h];
        try
        {
            for (int y = 0; y < h; y++)
            {
                var row = src.Slice(y * w, w);
                int o = y * w;
                for (int x = 0; x < w; x++)
                {
                    float acc = 0;
                    if (x >= radius && x < w - radius)
                    {
                        for (int k = -radius; k <= radius; k++)
                        {
                            acc += kernel[k + radius] * row[x + k];
                        }
                    }
                    else
                    {
                        for (int k = -radius; k <= radius; k++)
                        {
                            acc += kernel[k + radius] * row[CornerResponse.Reflect(x + k, w)];
                        }
                    }
                    tmp[o + x] = acc;
                }
            }
            var acc2 = new float[w];
            for (int y = 0; y < h; y++)
            {
                Array.Clear(acc2);
                for (int k = -radius; k <= radius; k++)
                {
                    float kk = kernel[k + radius];
                    var row = tmp.AsSpan(CornerResponse.Reflect(y + k, h) * w, w);
                    for (int x = 0; x < w; x++)
                    {
                        acc2[x] += kk * row[x];
                    }
                }
                int o = y * w;
                for (int x = 0; x < w; x++)
                {
                    dst[o + x] = (byte)(acc2[x] + 0.5f);
                }
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(tmp);
        }
        return dst;
    }
}
