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

    public static float Angle(ReadOnlySpan<byte> image, int width, int cx, int cy)
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
