using System.Buffers;

namespace Seamwright.Core.Features;

/// <summary>
/// Corner responses from the gradient structure tensor: the Harris measure
/// (Harris, Stephens, Alvey Vision Conference 1988) and the smaller eigenvalue
/// (Shi, Tomasi, CVPR 1994). Gradients are 3x3 Sobel, the tensor is summed over a
/// blockSize x blockSize window, borders reflect without repeating the edge pixel, and
/// gradients are scaled by 1 / (4 * blockSize * 255) so responses are comparable across
/// block sizes and with common library conventions.
/// </summary>
public static class CornerResponse
{
    /// <summary>Variance of the unscaled 3x3 Sobel derivative of white noise of unit variance.</summary>
    public const double SobelNoiseGain = 12.0;

    /// <summary>The gradient scale applied before the tensor sum.</summary>
    public static double GradientScale(int blockSize) => 1.0 / (4.0 * blockSize * 255.0);

    /// <summary>
    /// Computes the Harris response (when <paramref name="harris"/> is not empty) and the minimum
    /// eigenvalue (when <paramref name="minEigen"/> is not empty) for every pixel.
    /// </summary>
    public static void Compute(ReadOnlySpan<byte> pixels, int width, int height, int blockSize, double harrisK,
        Span<float> harris, Span<float> minEigen)
    {
        if (width < 2 || height < 2)
        {
            throw new ArgumentException("The image must be at least 2 x 2.");
        }
        if (blockSize < 1 || blockSize % 2 == 0)
        {
            throw new ArgumentOutOfRangeException(nameof(blockSize), "The block size must be odd and positive.");
        }
        int n = width * height;
        if ((!harris.IsEmpty && harris.Length < n) || (!minEigen.IsEmpty && minEigen.Length < n))
        {
            throw new ArgumentException("Output buffers are too small.");
        }
        float[] xx = ArrayPool<float>.Shared.Rent(n);
        float[] xy = ArrayPool<float>.Shared.Rent(n);
        float[] yy = ArrayPool<float>.Shared.Rent(n);
        try
        {
            GradientProducts(pixels, width, height, (float)GradientScale(blockSize), xx, xy, yy);
            int r = blockSize / 2;
            BoxSum(xx.AsSpan(0, n), width, height, r);
            BoxSum(xy.AsSpan(0, n), width, height, r);
            BoxSum(yy.AsSpan(0, n), width, height, r);
            float k = (float)harrisK;
            for (int i = 0; i < n; i++)
            {
                float a = xx[i], b = xy[i], c = yy[i];
                if (!harris.IsEmpty)
                {
                    harris[i] = a * c - b * b - k * (a + c) * (a + c);
                }
                if (!minEigen.IsEmpty)
                {
                    float ha = a * 0.5f, hc = c * 0.5f;
                    minEigen[i] = ha + hc - MathF.Sqrt((ha - hc) * (ha - hc) + b * b);
                }
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(xx);
            ArrayPool<float>.Shared.Return(xy);
            ArrayPool<float>.Shared.Return(yy);
        }
    }

    internal static int Reflect(int i, int n) => i < 0 ? -i : i >= n ? 2 * n - 2 - i : i;

    private static void GradientProducts(ReadOnlySpan<byte> p, int w, int h, float scale, float[] xx, float[] xy, float[] yy)
    {
        for (int y = 0; y < h; y++)
        {
            var r0 = p.Slice(Reflect(y - 1, h) * w, w);
            var r1 = p.Slice(y * w, w);
            var r2 = p.Slice(Reflect(y + 1, h) * w, w);
            int o = y * w;
            for (int x = 0; x < w; x++)
            {
                int xm, xp;
                if (x == 0 || x == w - 1)
                {
                    xm = Reflect(x - 1, w);
                    xp = Reflect(x + 1, w);
                }
                else
                {
                    xm = x - 1;
                    xp = x + 1;
                }
                int dx = r0[xp] - r0[xm] + 2 * (r1[xp] - r1[xm]) + r2[xp] - r2[xm];
                int dy = r2[xm] + 2 * r2[x] + r2[xp] - r0[xm] - 2 * r0[x] - r0[xp];
                float fx = dx * scale, fy = dy * scale;
                xx[o + x] = fx * fx;
                xy[o + x] = fx * fy;
                yy[o + x] = fy * fy;
            }
        }
    }

    /// <summary>In-place unnormalised box sum of radius r with reflecting borders.</summary>
    private static void BoxSum(Span<float> data, int w, int h, int r)
    {
        if (r == 0)
        {
            return;
        }
        float[] pad = ArrayPool<float>.Shared.Rent(w + 2 * r);
        float[] rows = ArrayPool<float>.Shared.Rent(w * h);
        double[] acc = ArrayPool<double>.Shared.Rent(w);
        try
        {
            for (int y = 0; y < h; y++)
            {
                var row = data.Slice(y * w, w);
                for (int i = 0; i < w + 2 * r; i++)
                {
                    pad[i] = row[Reflect(i - r, w)];
                }
                double s = 0;
                for (int i = 0; i < 2 * r + 1; i++)
                {
                    s += pad[i];
                }
                var dst = rows.AsSpan(y * w, w);
                dst[0] = (float)s;
                for (int x = 1; x < w; x++)
                {
                    s += pad[x + 2 * r] - pad[x - 1];
                    dst[x] = (float)s;
                }
            }
            Array.Clear(acc, 0, w);
            for (int k = -r; k <= r; k++)
            {
                var src = rows.AsSpan(Reflect(k, h) * w, w);
                for (int x = 0; x < w; x++)
                {
                    acc[x] += src[x];
                }
            }
            for (int y = 0; y < h; y++)
            {
                var dst = data.Slice(y * w, w);
                for (int x = 0; x < w; x++)
                {
                    dst[x] = (float)acc[x];
                }
                if (y + 1 < h)
                {
                    var add = rows.AsSpan(Reflect(y + 1 + r, h) * w, w);
                    var sub = rows.AsSpan(Reflect(y - r, h) * w, w);
                    for (int x = 0; x < w; x++)
                    {
                        acc[x] += add[x] - sub[x];
                    }
                }
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(pad);
            ArrayPool<float>.Shared.Return(rows);
            ArrayPool<double>.Shared.Return(acc);
        }
    }
}
