using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace Seamwright.Core.Features;

/// <summary>
/// Orientation of a patch as the direction from its centre to the intensity centroid of a disc
/// (Rosin, "Measuring corner properties", CVIU 1999; used for oriented binary descriptors by
/// Rublee et al., ICCV 2011). Full 360 degrees, in radians, image axes (x right, y down).
/// </summary>
internal static class IntensityCentroid
{
    public const int Radius = 15;

    /// <summary>Half-width of the disc on each row offset 0..Radius.</summary>
    internal static readonly int[] HalfWidth = BuildHalfWidth();

    /// <summary>Per row offset 0..Radius: 32 signed weights (k - Radius inside the disc, else 0) and 32 ones-or-zeros.</summary>
    private static readonly sbyte[] RowWeights = BuildRowWeights(false);
    private static readonly sbyte[] RowMask = BuildRowWeights(true);

    public static float Angle(ReadOnlySpan<byte> image, int width, int cx, int cy)
    {
        if (Avx2.IsSupported && cx - Radius >= 0 && cy - Radius >= 0 && (cy + Radius) * width + cx + Radius + 1 < image.Length)
        {
            return AngleAvx2(image, width, cx, cy);
        }
        return AnglePlain(image, width, cx, cy);
    }

    /// <summary>
    /// The same integer moments, 32 pixels of a row at a time (the 32nd has weight 0): unsigned
    /// pixel times signed weight summed in pairs (at most 2 x 255 x 15, exact in 16 bits), then
    /// in 32 bits. Integer sums are exact in any order, so the angle is the same as the plain path's.
    /// </summary>
    private static unsafe float AngleAvx2(ReadOnlySpan<byte> image, int width, int cx, int cy)
    {
        var ones = Vector256.Create((short)1);
        var m10 = Vector256<int>.Zero;
        var m01 = Vector256<int>.Zero;
        fixed (byte* img = image)
        fixed (sbyte* weights = RowWeights)
        fixed (sbyte* mask = RowMask)
        {
            byte* centre = img + cy * width + cx - Radius;
            for (int v = -Radius; v <= Radius; v++)
            {
                var row = Avx.LoadVector256(centre + v * width);
                int a = Math.Abs(v) * 32;
                var moment = Avx2.MultiplyAddAdjacent(Avx2.MultiplyAddAdjacent(row, Avx.LoadVector256(weights + a)), ones);
                var sum = Avx2.MultiplyAddAdjacent(Avx2.MultiplyAddAdjacent(row, Avx.LoadVector256(mask + a)), ones);
                m10 += moment;
                m01 += sum * Vector256.Create(v);
            }
        }
        return MathF.Atan2(Vector256.Sum(m01), Vector256.Sum(m10));
    }

    private static sbyte[] BuildRowWeights(bool mask)
    {
        var table = new sbyte[(Radius + 1) * 32];
        for (int v = 0; v <= Radius; v++)
        {
            int u0 = BuildHalfWidth()[v];
            for (int k = 0; k < 32; k++)
            {
                int u = k - Radius;
                table[v * 32 + k] = (sbyte)(Math.Abs(u) <= u0 ? (mask ? 1 : u) : 0);
            }
        }
        return table;
    }

    internal static float AnglePlain(ReadOnlySpan<byte> image, int width, int cx, int cy)
    {
        long m10 = 0, m01 = 0;
        int centre = cy * width + cx;
        for (int v = -Radius; v <= Radius; v++)
        {
            int u0 = HalfWidth[Math.Abs(v)];
            var row = image.Slice(centre + v * width - u0, 2 * u0 + 1);
            long rowSum = 0, rowMoment = 0;
            for (int k = 0; k < row.Length; k++)
            {
                int p = row[k];
                rowSum += p;
                rowMoment += (k - u0) * p;
            }
            m10 += rowMoment;
            m01 += v * rowSum;
        }
        return MathF.Atan2(m01, m10);
    }

    private static int[] BuildHalfWidth()
    {
        var h = new int[Radius + 1];
        for (int v = 0; v <= Radius; v++)
        {
            h[v] = (int)Math.Floor(Math.Sqrt(Radius * Radius - v * v) + 0.5);
        }
        return h;
    }
}
