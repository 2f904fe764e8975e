using System.Runtime.CompilerServices;

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
