using System.Numerics;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>A single-channel image of floats (row-major), the working type of the scale space.</summary>
public sealed class FloatPlane
{
    public FloatPlane(int width, int height)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(width, 1);
        ArgumentOutOfRangeException.ThrowIfLessThan(height, 1);
        Width = width;
        Height = height;
        Data = new float[width * height];
    }

    public int Width { get; }

    public int Height { get; }

    public float[] Data { get; }

    public Span<float> Row(int y) => Data.AsSpan(y * Width, Width);

    public float this[int x, int y] => Data[y * Width + x];

    /// <summary>Every second pixel in both directions, starting at (0, 0): pixel (x, y) here is (2x, 2y) of the source.</summary>
    public FloatPlane HalfSize()
    {
        var half = new FloatPlane(Math.Max(1, Width / 2), Math.Max(1, Height / 2));
        for (int y = 0; y < half.Height; y++)
        {
            var src = Row(2 * y);
            var dst = half.Row(y);
            for (int x = 0; x < dst.Length; x++)
            {
                dst[x] = src[2 * x];
            }
        }
        return half;
    }

    /// <summary>Twice the size by bilinear interpolation: pixel (x, y) here is (x / 2, y / 2) of this plane.</summary>
    public FloatPlane DoubleSize()
    {
        var big = new FloatPlane(2 * Width, 2 * Height);
        for (int y = 0; y < big.Height; y++)
        {
            float fy = 0.5f * y;
            int y0 = Math.Min((int)fy, Height - 1), y1 = Math.Min(y0 + 1, Height - 1);
            float wy = fy - y0;
            var r0 = Row(y0);
            var r1 = Row(y1);
            var dst = big.Row(y);
            for (int x = 0; x < big.Width; x++)
            {
                float fx = 0.5f * x;
                int x0 = Math.Min((int)fx, Width - 1), x1 = Math.Min(x0 + 1, Width - 1);
                float wx = fx - x0;
                float top = r0[x0] + wx * (r0[x1] - r0[x0]);
                float bottom = r1[x0] + wx * (r1[x1] - r1[x0]);
                dst[x] = top + wy * (bottom - top);
            }
        }
        return big;
    }

    /// <summary>This plane blurred by a Gaussian of deviation <paramref name="sigma"/> pixels (separable, edges clamped).</summary>
    public FloatPlane Blurred(double sigma)
    {
        var kernel = GaussianBlur.Kernel(sigma);
        var tmp = new FloatPlane(Width, Height);
        int r = kernel.Length / 2;
        var padded = new float[Width + 2 * r];
        for (int y = 0; y < Height; y++)
        {
            var src = Row(y);
            src.CopyTo(padded.AsSpan(r));
            padded.AsSpan(0, r).Fill(src[0]);
            padded.AsSpan(r + Width, r).Fill(src[Width - 1]);
            var dst = tmp.Row(y);
            for (int k = 0; k < kernel.Length; k++)
            {
                AddScaled(dst, padded.AsSpan(k, Width), kernel[k]);
            }
        }
        var result = new FloatPlane(Width, Height);
        for (int y = 0; y < Height; y++)
        {
            var dst = result.Row(y);
            for (int k = 0; k < kernel.Length; k++)
            {
                AddScaled(dst, tmp.Row(Math.Clamp(y + k - r, 0, Height - 1)), kernel[k]);
            }
        }
        return result;
    }

    /// <summary>a - b, pixel by pixel.</summary>
    public static FloatPlane Difference(FloatPlane a, FloatPlane b)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        var d = new FloatPlane(a.Width, a.Height);
        var x = a.Data.AsSpan();
        var y = b.Data.AsSpan();
        var o = d.Data.AsSpan();
        int i = 0;
        for (; i <= o.Length - Vector<float>.Count; i += Vector<float>.Count)
        {
            (new Vector<float>(x[i..]) - new Vector<float>(y[i..])).CopyTo(o[i..]);
        }
        for (; i < o.Length; i++)
        {
            o[i] = x[i] - y[i];
        }
        return d;
    }

    /// <summary>True when (x, y) has a neighbour on every side (central differences are defined).</summary>
    public bool IsInterior(int x, int y) => x > 0 && y > 0 && x < Width - 1 && y < Height - 1;

    /// <summary>Central-difference gradient at an interior pixel (x right, y down).</summary>
    public (double Dx, double Dy) CentralGradient(int x, int y)
    {
        int k = y * Width + x;
        return (Data[k + 1] - Data[k - 1], Data[k + Width] - Data[k - Width]);
    }

    private static void AddScaled(Span<float> dst, ReadOnlySpan<float> src, float w)
    {
        int i = 0;
        var wv = new Vector<float>(w);
        for (; i <= dst.Length - Vector<float>.Count; i += Vector<float>.Count)
        {
            (new Vector<float>(dst[i..]) + wv * new Vector<float>(src[i..])).CopyTo(dst[i..]);
        }
        for (; i < dst.Length; i++)
        {
            dst[i] += w * src[i];
        }
    }
}
