using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace Seamwright.Core.Features;

/// <summary>
/// The 256-test binary descriptor: bit i is set when the smoothed intensity at the first point of
/// test i is below the one at the second point, both rotated by the keypoint orientation
/// (the steered-test construction of Rublee et al., ICCV 2011, with Seamwright's own pattern).
/// </summary>
internal static class BinaryDescriptor
{
    /// <summary>Largest offset of a rotated test point from the centre, in pixels.</summary>
    public const int Reach = 16;

    /// <summary>The embedded pattern as four float tables (x1, y1, x2, y2), 256 entries each.</summary>
    private static readonly float[] Columns = BuildColumns();

    /// <summary>
    /// The descriptor with the embedded pattern. Eight tests at a time where AVX2 is available: the
    /// same rotated, rounded offsets (products, sum, round half to even) and comparisons as <see cref="Test"/>.
    /// The keypoint must lie at least Reach + 1 pixels inside the image (4-byte gathers read 3 bytes further).
    /// </summary>
    public static Descriptor256 Compute(ReadOnlySpan<byte> smoothed, int width, int cx, int cy, float angle)
    {
        if (!Avx2.IsSupported)
        {
            return Compute(smoothed, width, cx, cy, angle, DescriptorPattern.Points);
        }
        float c = MathF.Cos(angle), s = MathF.Sin(angle);
        int centre = cy * width + cx;
        if (centre - Reach * width - Reach < 0 || centre + Reach * width + Reach + 3 >= smoothed.Length)
        {
            throw new ArgumentOutOfRangeException(nameof(cy), "The keypoint is too close to the image border.");
        }
        var vc = Vector256.Create(c);
        var vs = Vector256.Create(s);
        var vw = Vector256.Create(width);
        var vcentre = Vector256.Create(centre);
        var low = Vector256.Create(0xFF);
        Span<ulong> words = stackalloc ulong[4];
        unsafe
        {
            fixed (byte* image = smoothed)
            fixed (float* p = Columns)
            {
                for (int t = 0; t < 256; t += Vector256<float>.Count)
                {
                    var x1 = Avx.LoadVector256(p + t);
                    var y1 = Avx.LoadVector256(p + 256 + t);
                    var x2 = Avx.LoadVector256(p + 512 + t);
                    var y2 = Avx.LoadVector256(p + 768 + t);
                    var a = vcentre + Vector256.ConvertToInt32(Avx.RoundToNearestInteger(vs * x1 + vc * y1)) * vw
                        + Vector256.ConvertToInt32(Avx.RoundToNearestInteger(vc * x1 - vs * y1));
                    var b = vcentre + Vector256.ConvertToInt32(Avx.RoundToNearestInteger(vs * x2 + vc * y2)) * vw
                        + Vector256.ConvertToInt32(Avx.RoundToNearestInteger(vc * x2 - vs * y2));
                    var pa = Avx2.GatherVector256((int*)image, a, 1) & low;
                    var pb = Avx2.GatherVector256((int*)image, b, 1) & low;
                    ulong bits = Vector256.LessThan(pa, pb).ExtractMostSignificantBits();
                    words[t / 64] |= bits << (t % 64);
                }
            }
        }
        return new Descriptor256(words[0], words[1], words[2], words[3]);
    }

    private static float[] BuildColumns()
    {
        var points = DescriptorPattern.Points;
        var columns = new float[4 * 256];
        for (int t = 0; t < 256; t++)
        {
            for (int j = 0; j < 4; j++)
            {
                columns[j * 256 + t] = points[4 * t + j];
            }
        }
        return columns;
    }

    /// <summary>The descriptor with any pattern, one test at a time.</summary>
    public static Descriptor256 Compute(ReadOnlySpan<byte> smoothed, int width, int cx, int cy, float angle, ReadOnlySpan<sbyte> pattern)
    {
        float c = MathF.Cos(angle), s = MathF.Sin(angle);
        int centre = cy * width + cx;
        ulong w0 = 0, w1 = 0, w2 = 0, w3 = 0;
        for (int t = 0; t < 64; t++)
        {
            w0 |= Test(smoothed, width, centre, c, s, pattern.Slice(t * 4, 4)) << t;
            w1 |= Test(smoothed, width, centre, c, s, pattern.Slice((t + 64) * 4, 4)) << t;
            w2 |= Test(smoothed, width, centre, c, s, pattern.Slice((t + 128) * 4, 4)) << t;
            w3 |= Test(smoothed, width, centre, c, s, pattern.Slice((t + 192) * 4, 4)) << t;
        }
        return new Descriptor256(w0, w1, w2, w3);
    }

    /// <summary>One test: 1 when the first rotated point is darker than the second.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ulong Test(ReadOnlySpan<byte> smoothed, int width, int centre, float c, float s, ReadOnlySpan<sbyte> test)
    {
        float x1 = test[0], y1 = test[1], x2 = test[2], y2 = test[3];
        int a = centre + (int)MathF.Round(s * x1 + c * y1) * width + (int)MathF.Round(c * x1 - s * y1);
        int b = centre + (int)MathF.Round(s * x2 + c * y2) * width + (int)MathF.Round(c * x2 - s * y2);
        return smoothed[a] < smoothed[b] ? 1UL : 0UL;
    }
}
