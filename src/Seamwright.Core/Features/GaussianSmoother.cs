using System.Buffers;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;

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
        float[] padded = ArrayPool<float>.Shared.Rent(pw);
        var dst = new byte[n];
        var rows = new int[kernel.Length];
        try
        {
            ToFloats(src[..n], image);
            for (int y = 0; y < h; y++)
            {
                for (int k = -radius; k <= radius; k++)
                {
                    rows[k + radius] = CornerResponse.Reflect(y + k, h) * w;
                }
                Vertical(image, rows, kernel, padded.AsSpan(radius, w));
                for (int i = 1; i <= radius; i++)
                {
                    padded[radius - i] = padded[radius + CornerResponse.Reflect(-i, w)];
                    padded[radius + w - 1 + i] = padded[radius + CornerResponse.Reflect(w - 1 + i, w)];
                }
                Horizontal(padded, kernel, dst.AsSpan(y * w, w));
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(image);
            ArrayPool<float>.Shared.Return(padded);
        }
        return dst;
    }

    /// <summary>dst[i] = src[i] for every source byte.</summary>
    internal static void ToFloats(ReadOnlySpan<byte> src, Span<float> dst)
    {
        int i = 0;
        if (Vector256.IsHardwareAccelerated)
        {
            ref byte s0 = ref MemoryMarshal.GetReference(src);
            ref float d0 = ref MemoryMarshal.GetReference(dst);
            for (; i + Vector256<byte>.Count <= src.Length; i += Vector256<byte>.Count)
            {
                var (lo, hi) = Vector256.Widen(Vector256.LoadUnsafe(ref s0, (nuint)i));
                var (a, b) = Vector256.Widen(lo);
                var (c, d) = Vector256.Widen(hi);
                Vector256.ConvertToSingle(a.AsInt32()).StoreUnsafe(ref d0, (nuint)i);
                Vector256.ConvertToSingle(b.AsInt32()).StoreUnsafe(ref d0, (nuint)(i + 8));
                Vector256.ConvertToSingle(c.AsInt32()).StoreUnsafe(ref d0, (nuint)(i + 16));
                Vector256.ConvertToSingle(d.AsInt32()).StoreUnsafe(ref d0, (nuint)(i + 24));
            }
        }
        for (; i < src.Length; i++)
        {
            dst[i] = src[i];
        }
    }

    /// <summary>column[x] = sum over k of image[rows[k] + x] * kernel[k], added in k order from zero.</summary>
    private static void Vertical(float[] image, int[] rows, float[] kernel, Span<float> column)
    {
        int x = 0, w = column.Length;
        if (Vector256.IsHardwareAccelerated)
        {
            ref float i0 = ref MemoryMarshal.GetArrayDataReference(image);
            for (; x + Vector256<float>.Count <= w; x += Vector256<float>.Count)
            {
                var acc = Vector256<float>.Zero;
                for (int k = 0; k < kernel.Length; k++)
                {
                    acc += Vector256.LoadUnsafe(ref i0, (nuint)(rows[k] + x)) * Vector256.Create(kernel[k]);
                }
                acc.StoreUnsafe(ref MemoryMarshal.GetReference(column), (nuint)x);
            }
        }
        for (; x < w; x++)
        {
            float acc = 0;
            for (int k = 0; k < kernel.Length; k++)
            {
                acc += image[rows[k] + x] * kernel[k];
            }
            column[x] = acc;
        }
    }

    /// <summary>dst[x] = round(sum over k of padded[x + k] * kernel[k]), added in k order from zero.</summary>
    private static void Horizontal(float[] padded, float[] kernel, Span<byte> dst)
    {
        int x = 0, w = dst.Length;
        if (Vector256.IsHardwareAccelerated)
        {
            ref float p0 = ref MemoryMarshal.GetArrayDataReference(padded);
            var half = Vector256.Create(0.5f);
            int step = 4 * Vector256<float>.Count;
            for (; x + step <= w; x += step)
            {
                var i0 = Vector256.ConvertToInt32(Row(ref p0, x, kernel) + half);
                var i1 = Vector256.ConvertToInt32(Row(ref p0, x + 8, kernel) + half);
                var i2 = Vector256.ConvertToInt32(Row(ref p0, x + 16, kernel) + half);
                var i3 = Vector256.ConvertToInt32(Row(ref p0, x + 24, kernel) + half);
                Vector256.Narrow(Vector256.Narrow(i0, i1), Vector256.Narrow(i2, i3)).AsByte()
                    .StoreUnsafe(ref MemoryMarshal.GetReference(dst), (nuint)x);
            }
        }
        for (; x < w; x++)
        {
            float acc = 0;
            for (int k = 0; k < kernel.Length; k++)
            {
                acc += padded[x + k] * kernel[k];
            }
            dst[x] = (byte)(acc + 0.5f);
        }
    }

    private static Vector256<float> Row(ref float p0, int x, float[] kernel)
    {
        var acc = Vector256<float>.Zero;
        for (int k = 0; k < kernel.Length; k++)
        {
            acc += Vector256.LoadUnsafe(ref p0, (nuint)(x + k)) * Vector256.Create(kernel[k]);
        }
        return acc;
    }
}
