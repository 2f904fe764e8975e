using System.Buffers;
using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;

namespace Seamwright.Core.Features;

/// <summary>
/// Corner responses from the gradient structure tensor: the Harris measure
/// (Harris, Stephens, Alvey Vision Conference 1988) and the smaller eigenvalue
/// (Shi, Tomasi, CVPR 1994). Gradients are 3x3 Sobel, the tensor is summed over a
/// blockSize x blockSize window, borders reflect without repeating the edge pixel, and
/// gradients are scaled by 1 / (4 * blockSize * 255) so responses are comparable across
/// block sizes and with common library conventions. Streams row by row: horizontal window sums
/// are kept for the last blockSize rows only.
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
        if (blockSize < 1 || blockSize % 2 == 0 || blockSize / 2 >= Math.Min(width, height))
        {
            throw new ArgumentOutOfRangeException(nameof(blockSize), "The block size must be odd, positive and smaller than the image.");
        }
        int n = width * height;
        if ((!harris.IsEmpty && harris.Length < n) || (!minEigen.IsEmpty && minEigen.Length < n))
        {
            throw new ArgumentException("Output buffers are too small.");
        }
        int r = blockSize / 2;
        int w = width;
        // Ring of horizontally summed rows: slot s holds source row ringRow[s], three channels.
        float[] ring = ArrayPool<float>.Shared.Rent(3 * blockSize * w);
        float[] products = ArrayPool<float>.Shared.Rent(3 * (w + 2 * r));
        float[] sums = ArrayPool<float>.Shared.Rent(3 * w);
        var ringRow = new int[blockSize];
        Array.Fill(ringRow, -1);
        float scale = (float)GradientScale(blockSize);
        float k = (float)harrisK;
        try
        {
            for (int y = 0; y < height; y++)
            {
                var xx = sums.AsSpan(0, w);
                var xy = sums.AsSpan(w, w);
                var yy = sums.AsSpan(2 * w, w);
                xx.Clear();
                xy.Clear();
                yy.Clear();
                for (int dy = -r; dy <= r; dy++)
                {
                    int src = Reflect(y + dy, height);
                    int slot = src % blockSize;
                    if (ringRow[slot] != src)
                    {
                        HorizontalRow(pixels, w, height, src, r, scale, products, ring.AsSpan(3 * slot * w, 3 * w));
                        ringRow[slot] = src;
                    }
                    Add(xx, ring.AsSpan(3 * slot * w, w));
                    Add(xy, ring.AsSpan(3 * slot * w + w, w));
                    Add(yy, ring.AsSpan(3 * slot * w + 2 * w, w));
                }
                int o = y * w;
                if (!minEigen.IsEmpty)
                {
                    MinEigenRow(xx, xy, yy, minEigen.Slice(o, w));
                }
                if (!harris.IsEmpty)
                {
                    var dst = harris.Slice(o, w);
                    for (int x = 0; x < w; x++)
                    {
                        float a = xx[x], b = xy[x], c = yy[x];
                        dst[x] = a * c - b * b - k * (a + c) * (a + c);
                    }
                }
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(ring);
            ArrayPool<float>.Shared.Return(products);
            ArrayPool<float>.Shared.Return(sums);
        }
    }

    private static void MinEigenRow(ReadOnlySpan<float> xx, ReadOnlySpan<float> xy, ReadOnlySpan<float> yy, Span<float> dst)
    {
        int x = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var half = new Vector<float>(0.5f);
            var vxx = MemoryMarshal.Cast<float, Vector<float>>(xx);
            var vxy = MemoryMarshal.Cast<float, Vector<float>>(xy);
            var vyy = MemoryMarshal.Cast<float, Vector<float>>(yy);
            var vd = MemoryMarshal.Cast<float, Vector<float>>(dst);
            for (int i = 0; i < vd.Length; i++)
            {
                var ha = vxx[i] * half;
                var hc = vyy[i] * half;
                var b = vxy[i];
                var diff = ha - hc;
                vd[i] = ha + hc - Vector.SquareRoot(diff * diff + b * b);
            }
            x = vd.Length * Vector<float>.Count;
        }
        for (; x < dst.Length; x++)
        {
            float ha = xx[x] * 0.5f, hc = yy[x] * 0.5f, b = xy[x];
            dst[x] = ha + hc - MathF.Sqrt((ha - hc) * (ha - hc) + b * b);
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static int Reflect(int i, int n) => i < 0 ? -i : i >= n ? 2 * n - 2 - i : i;

    private static void Add(Span<float> acc, ReadOnlySpan<float> row)
    {
        int x = 0;
        if (Vector.IsHardwareAccelerated)
        {
            var va = MemoryMarshal.Cast<float, Vector<float>>(acc);
            var vr = MemoryMarshal.Cast<float, Vector<float>>(row);
            for (int i = 0; i < va.Length; i++)
            {
                va[i] += vr[i];
            }
            x = va.Length * Vector<float>.Count;
        }
        for (; x < acc.Length; x++)
        {
            acc[x] += row[x];
        }
    }

    /// <summary>Gradient products of one source row, summed over the horizontal window, into three channels of dst.</summary>
    private static void HorizontalRow(ReadOnlySpan<byte> p, int w, int h, int y, int r, float scale, float[] products, Span<float> dst)
    {
        var r0 = p.Slice(Reflect(y - 1, h) * w, w);
        var r1 = p.Slice(y * w, w);
        var r2 = p.Slice(Reflect(y + 1, h) * w, w);
        int pw = w + 2 * r;
        var pxx = products.AsSpan(0, pw);
        var pxy = products.AsSpan(pw, pw);
        var pyy = products.AsSpan(2 * pw, pw);
        for (int x = 1; x < w - 1; x++)
        {
            int dx = r0[x + 1] - r0[x - 1] + 2 * (r1[x + 1] - r1[x - 1]) + r2[x + 1] - r2[x - 1];
            int dy = r2[x - 1] + 2 * r2[x] + r2[x + 1] - r0[x - 1] - 2 * r0[x] - r0[x + 1];
            float fx = dx * scale, fy = dy * scale;
            pxx[x + r] = fx * fx;
            pxy[x + r] = fx * fy;
            pyy[x + r] = fy * fy;
        }
        foreach (int x in (ReadOnlySpan<int>)[0, w - 1])
        {
            int xm = Reflect(x - 1, w), xp = Reflect(x + 1, w);
            int dx = r0[xp] - r0[xm] + 2 * (r1[xp] - r1[xm]) + r2[xp] - r2[xm];
            int dy = r2[xm] + 2 * r2[x] + r2[xp] - r0[xm] - 2 * r0[x] - r0[xp];
            float fx = dx * scale, fy = dy * scale;
            pxx[x + r] = fx * fx;
            pxy[x + r] = fx * fy;
            pyy[x + r] = fy * fy;
        }
        for (int i = 1; i <= r; i++)
        {
            // Reflect the products at the row ends (index r + x holds column x).
            pxx[r - i] = pxx[r + Reflect(-i, w)];
            pxy[r - i] = pxy[r + Reflect(-i, w)];
            pyy[r - i] = pyy[r + Reflect(-i, w)];
            pxx[r + w - 1 + i] = pxx[r + Reflect(w - 1 + i, w)];
            pxy[r + w - 1 + i] = pxy[r + Reflect(w - 1 + i, w)];
            pyy[r + w - 1 + i] = pyy[r + Reflect(w - 1 + i, w)];
        }
        BoxRow(pxx, dst[..w], r);
        BoxRow(pxy, dst.Slice(w, w), r);
        BoxRow(pyy, dst.Slice(2 * w, w), r);
    }

    private static void BoxRow(ReadOnlySpan<float> padded, Span<float> dst, int r)
    {
        dst.Clear();
        for (int k = 0; k <= 2 * r; k++)
        {
            Add(dst, padded.Slice(k, dst.Length));
        }
    }
}
