using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>Sign- and scale-aware helpers on transforms used when chaining links.</summary>
internal static class TransformOps
{
    /// <summary>
    /// The inverse, scaled so that w is positive at <paramref name="x"/>, <paramref name="y"/>
    /// (a point of the inverse's input); false when singular.
    /// </summary>
    public static bool TryOrientedInverse(in Transform2D t, double x, double y, out Transform2D inverse)
    {
        if (!t.TryInvert(out inverse))
        {
            return false;
        }
        inverse = Orient(inverse, x, y);
        return true;
    }

    /// <summary>Scaled by a positive or negative factor so that w at (x, y) is positive and the largest entry is about 1.</summary>
    public static Transform2D Orient(in Transform2D t, double x, double y)
    {
        double w = t.W(x, y);
        double norm = MaxAbs(t);
        if (norm == 0 || !double.IsFinite(norm))
        {
            return t;
        }
        double s = (w < 0 ? -1.0 : 1.0) / norm;
        return t.Scale(s);
    }

    public static double MaxAbs(in Transform2D t) =>
        Math.Max(Math.Max(Math.Max(Math.Abs(t.M11), Math.Abs(t.M12)), Math.Max(Math.Abs(t.M13), Math.Abs(t.M21))),
            Math.Max(Math.Max(Math.Abs(t.M22), Math.Abs(t.M23)), Math.Max(Math.Max(Math.Abs(t.M31), Math.Abs(t.M32)), Math.Abs(t.M33))));

    /// <summary>Isotropic normalisation x' = s (x - cx) as a matrix.</summary>
    public static Transform2D Normalizer(double s, double cx, double cy) => new(s, 0, -s * cx, 0, s, -s * cy, 0, 0, 1);

    public static Transform2D Denormalizer(double s, double cx, double cy) => new(1 / s, 0, cx, 0, 1 / s, cy, 0, 0, 1);

    /// <summary>Centroid of the first (or second) points of tie points; the image centre when there are none.</summary>
    public static (double X, double Y) Centroid(ReadOnlySpan<Correspondence> ties, bool first, ImageSize size)
    {
        if (ties.IsEmpty)
        {
            return ((size.Width - 1) / 2.0, (size.Height - 1) / 2.0);
        }
        double sx = 0, sy = 0;
        foreach (var c in ties)
        {
            sx += first ? c.X1 : c.X2;
            sy += first ? c.Y1 : c.Y2;
        }
        return (sx / ties.Length, sy / ties.Length);
    }

    /// <summary>Distance between two points (infinity when either is not finite).</summary>
    public static double Distance(double ax, double ay, double bx, double by)
    {
        double d = Math.Sqrt((ax - bx) * (ax - bx) + (ay - by) * (ay - by));
        return double.IsFinite(d) ? d : double.PositiveInfinity;
    }
}
