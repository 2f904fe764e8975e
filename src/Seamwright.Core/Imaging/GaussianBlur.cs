using System.Buffers;

namespace Seamwright.Core.Imaging;

/// <summary>
/// Separable Gaussian blur with a kernel truncated at 3 sigma and edges replicated. The
/// horizontal pass goes into a pooled float buffer, the vertical pass rounds to bytes.
/// </summary>
public static class GaussianBlur
{
    /// <summary>A normalised kernel of odd length 2 ceil(3 sigma) + 1.</summary>
    public static float[] Kernel(double sigma)
    {
        if (!double.IsFinite(sigma) || sigma <= 0)
        {
            throw new ArgumentOutOfRangeException(nameof(sigma), sigma, "Sigma must be a positive finite number.");
        }
        int radius = Math.Max(1, (int)Math.Ceiling(3 * sigma));
        var kernel = new float[2 * radius + 1];
        double sum = 0;
        var raw = new double[kernel.Length];
        for (int i = -radius; i <= radius; i++)
        {
            raw[i + radius] = Math.Exp(-(i * i) / (2 * sigma * sigma));
            sum += raw[i + radius];
        }
        for (int i = 0; i < kernel.Length; i++)
        {
            kernel[i] = (float)(raw[i] / sum);
        }
        return kernel;
    }

    /// <summary>Returns a blurred copy (a plain copy when sigma is zero).</summary>
    public static GrayImage Apply(GrayImage source, double sigma)
    {
        ArgumentNullException.ThrowIfNull(source);
        if (sigma == 0)
        {
            return new GrayImage(source.Width, source.Height, (byte[])source.Pixels.Clone());
        }
        float[] kernel = Kernel(sigma);
        int radius = kernel.Length / 2;
        int w = source.Width;
        int h = source.Height;
        var result = new GrayImage(w, h);
        float[] tmpBuffer = ArrayPool<float>.Shared.Rent(w * h);
        try
        {
            Span<float> tmp = tmpBuffer.AsSpan(0, w * h);
            for (int y = 0; y < h; y++)
            {
                ReadOnlySpan<byte> src = source.Row(y);
                Span<float> dst = tmp.Slice(y * w, w);
                for (int x = 0; x < w; x++)
                {
                    float sum = 0;
                    for (int k = -radius; k <= radius; k++)
                    {
                        int xx = Math.Clamp(x + k, 0, w - 1);
                        sum += kernel[k + radius] * src[xx];
                    }
                    dst[x] = sum;
                }
            }
            float[] accBuffer = ArrayPool<float>.Shared.Rent(w);
            try
            {
                Span<float> acc = accBuffer.AsSpan(0, w);
                for (int y = 0; y < h; y++)
                {
                    acc.Clear();
                    for (int k = -radius; k <= radius; k++)
                    {
                        int yy = Math.Clamp(y + k, 0, h - 1);
                        float kw = kernel[k + radius];
                        ReadOnlySpan<float> src = tmp.Slice(yy * w, w);
                        for (int x = 0; x < w; x++)
                        {
                            acc[x] += kw * src[x];
                        }
                    }
                    Span<byte> dst = result.Row(y);
                    for (int x = 0; x < w; x++)
                    {
                        dst[x] = AreaResampler.ToByte(acc[x]);
                    }
                }
            }
            finally
            {
                ArrayPool<float>.Shared.Return(accBuffer);
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(tmpBuffer);
        }
        return result;
    }
}
