using System.Buffers;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;

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
        // Source rows as floats with one reflected column on each side: slot s holds row floatRow[s].
        float[] rows = ArrayPool<float>.Shared.Rent(3 * (w + 2));
        var ringRow = new int[blockSize];
        var floatRow = new int[3];
        var window = new int[blockSize];
        Array.Fill(ringRow, -1);
        Array.Fill(floatRow, -1);
        float scale = (float)GradientScale(blockSize);
        float k = (float)harrisK;
        var buffers = new RowBuffers(pixels, w, height, r, scale, products, rows, floatRow);
        try
        {
            for (int y = 0; y < height; y++)
            {
                for (int dy = -r; dy <= r; dy++)
                {
                    int src = Reflect(y + dy, height);
                    int slot = src % blockSize;
                    if (ringRow[slot] != src)
                    {
                        HorizontalRow(ref buffers, src, ring.AsSpan(3 * slot * w, 3 * w));
                        ringRow[slot] = src;
                    }
                    window[dy + r] = 3 * slot * w;
                }
                int o = y * w;
                VerticalRow(ring, window, w, k,
                    harris.IsEmpty ? Span<float>.Empty : harris.Slice(o, w),
                    minEigen.IsEmpty ? Span<float>.Empty : minEigen.Slice(o, w));
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(ring);
            ArrayPool<float>.Shared.Return(products);
            ArrayPool<float>.Shared.Return(rows);
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static int Reflect(int i, int n) => i < 0 ? -i : i >= n ? 2 * n - 2 - i : i;

    /// <summary>
    /// Sums the window's rows (in window order, from zero) per channel and turns them into the
    /// responses. The vector and scalar paths do the same float operations in the same order.
    /// </summary>
    private static void VerticalRow(float[] ring, int[] window, int w, float k, Span<float> harris, Span<float> minEigen)
    {
        int x = 0;
        ref float ring0 = ref MemoryMarshal.GetArrayDataReference(ring);
        if (Vector256.IsHardwareAccelerated)
        {
            var half = Vector256.Create(0.5f);
            var vk = Vector256.Create(k);
            for (; x + Vector256<float>.Count <= w; x += Vector256<float>.Count)
            {
                var a = Vector256<float>.Zero;
                var b = Vector256<float>.Zero;
                var c = Vector256<float>.Zero;
                foreach (int o in window)
                {
                    a += Vector256.LoadUnsafe(ref ring0, (nuint)(o + x));
                    b += Vector256.LoadUnsafe(ref ring0, (nuint)(o + w + x));
                    c += Vector256.LoadUnsafe(ref ring0, (nuint)(o + 2 * w + x));
                }
                if (!minEigen.IsEmpty)
                {
                    var ha = a * half;
                    var hc = c * half;
                    var diff = ha - hc;
                    (ha + hc - Vector256.Sqrt(diff * diff + b * b)).StoreUnsafe(ref MemoryMarshal.GetReference(minEigen), (nuint)x);
                }
                if (!harris.IsEmpty)
                {
                    (a * c - b * b - vk * (a + c) * (a + c)).StoreUnsafe(ref MemoryMarshal.GetReference(harris), (nuint)x);
                }
            }
        }
        for (; x < w; x++)
        {
            float a = 0, b = 0, c = 0;
            foreach (int o in window)
            {
                a += ring[o + x];
                b += ring[o + w + x];
                c += ring[o + 2 * w + x];
            }
            if (!minEigen.IsEmpty)
            {
                float ha = a * 0.5f, hc = c * 0.5f;
                minEigen[x] = ha + hc - MathF.Sqrt((ha - hc) * (ha - hc) + b * b);
            }
            if (!harris.IsEmpty)
            {
                harris[x] = a * c - b * b - k * (a + c) * (a + c);
            }
        }
    }

    /// <summary>Scratch space and constants of one response computation.</summary>
    private ref struct RowBuffers
    {
        public RowBuffers(ReadOnlySpan<byte> pixels, int w, int h, int r, float scale, float[] products, float[] rows, int[] floatRow)
        {
            Pixels = pixels;
            W = w;
            H = h;
            R = r;
            Scale = scale;
            Products = products;
            Rows = rows;
            FloatRow = floatRow;
        }

        public ReadOnlySpan<byte> Pixels;
        public int W;
        public int H;
        public int R;
        public float Scale;
        public float[] Products;
        public float[] Rows;
        public int[] FloatRow;

        /// <summary>Row y as floats: index j holds column j - 1, with the columns -1 and w reflected.</summary>
        public readonly ReadOnlySpan<float> FloatRowOf(int y)
        {
            int slot = y % 3;
            var dst = Rows.AsSpan(slot * (W + 2), W + 2);
            if (FloatRow[slot] != y)
            {
                var src = Pixels.Slice(y * W, W);
                GaussianSmoother.ToFloats(src, dst.Slice(1, W));
                dst[0] = src[Reflect(-1, W)];
                dst[W + 1] = src[Reflect(W, W)];
                FloatRow[slot] = y;
            }
            return dst;
        }
    }

    /// <summary>
    /// Gradient products of one source row, summed over the horizontal window, into three channels of dst.
    /// Sobel sums of 8-bit values are small integers, exact in float in any order.
    /// </summary>
    private static void HorizontalRow(ref RowBuffers b, int y, Span<float> dst)
    {
        int w = b.W, r = b.R;
        var r0 = b.FloatRowOf(Reflect(y - 1, b.H));
        var r1 = b.FloatRowOf(y);
        var r2 = b.FloatRowOf(Reflect(y + 1, b.H));
        int pw = w + 2 * r;
        var pxx = b.Products.AsSpan(0, pw);
        var pxy = b.Products.AsSpan(pw, pw);
        var pyy = b.Products.AsSpan(2 * pw, pw);
        float scale = b.Scale;
        int x = 0;
        if (Vector256.IsHardwareAccelerated)
        {
            ref float a0 = ref MemoryMarshal.GetReference(r0);
            ref float a1 = ref MemoryMarshal.GetReference(r1);
            ref float a2 = ref MemoryMarshal.GetReference(r2);
            var two = Vector256.Create(2f);
            var vs = Vector256.Create(scale);
            for (; x + Vector256<float>.Count <= w; x += Vector256<float>.Count)
            {
                nuint i = (nuint)x;
                var l0 = Vector256.LoadUnsafe(ref a0, i);
                var c0 = Vector256.LoadUnsafe(ref a0, i + 1);
                var h0 = Vector256.LoadUnsafe(ref a0, i + 2);
                var l1 = Vector256.LoadUnsafe(ref a1, i);
                var h1 = Vector256.LoadUnsafe(ref a1, i + 2);
                var l2 = Vector256.LoadUnsafe(ref a2, i);
                var c2 = Vector256.LoadUnsafe(ref a2, i + 1);
                var h2 = Vector256.LoadUnsafe(ref a2, i + 2);
                var fx = (h0 - l0 + two * (h1 - l1) + h2 - l2) * vs;
                var fy = (l2 + two * c2 + h2 - l0 - two * c0 - h0) * vs;
                (fx * fx).StoreUnsafe(ref MemoryMarshal.GetReference(pxx), i + (nuint)r);
                (fx * fy).StoreUnsafe(ref MemoryMarshal.GetReference(pxy), i + (nuint)r);
                (fy * fy).StoreUnsafe(ref MemoryMarshal.GetReference(pyy), i + (nuint)r);
            }
        }
        for (; x < w; x++)
        {
            float fx = (r0[x + 2] - r0[x] + 2f * (r1[x + 2] - r1[x]) + r2[x + 2] - r2[x]) * scale;
            float fy = (r2[x] + 2f * r2[x + 1] + r2[x + 2] - r0[x] - 2f * r0[x + 1] - r0[x + 2]) * scale;
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

    /// <summary>dst[x] = sum of padded[x .. x + 2r], added in that order from zero.</summary>
    private static void BoxRow(ReadOnlySpan<float> padded, Span<float> dst, int r)
    {
        int x = 0, taps = 2 * r + 1;
        if (Vector256.IsHardwareAccelerated)
        {
            ref float p0 = ref MemoryMarshal.GetReference(padded);
            for (; x + Vector256<float>.Count <= dst.Length; x += Vector256<float>.Count)
            {
                var acc = Vector256<float>.Zero;
                for (int k = 0; k < taps; k++)
                {
                    acc += Vector256.LoadUnsafe(ref p0, (nuint)(x + k));
                }
                acc.StoreUnsafe(ref MemoryMarshal.GetReference(dst), (nuint)x);
            }
        }
        for (; x < dst.Length; x++)
        {
            float acc = 0;
            for (int k = 0; k < taps; k++)
            {
                acc += padded[x + k];
            }
            dst[x] = acc;
        }
    }
}
