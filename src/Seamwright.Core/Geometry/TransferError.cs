namespace Seamwright.Core.Geometry;

/// <summary>
/// Geometric errors of a transform on one match, in pixels. A point that maps behind the camera
/// (w &lt;= 0) or cannot be mapped has an infinite error, so it is never an inlier.
/// </summary>
public static class TransferError
{
    /// <summary>Squared forward transfer error ||H(p1) - p2||^2, the inlier test of the whole estimator.</summary>
    public static double ForwardSquared(in Transform2D h, in Correspondence m)
    {
        double w = h.M31 * m.X1 + h.M32 * m.Y1 + h.M33;
        if (!(w > 0))
        {
            return double.PositiveInfinity;
        }
        double u = (h.M11 * m.X1 + h.M12 * m.Y1 + h.M13) / w - m.X2;
        double v = (h.M21 * m.X1 + h.M22 * m.Y1 + h.M23) / w - m.Y2;
        double d = u * u + v * v;
        return double.IsFinite(d) ? d : double.PositiveInfinity;
    }

    /// <summary>Forward transfer error ||H(p1) - p2||.</summary>
    public static double Forward(in Transform2D h, in Correspondence m) => Math.Sqrt(ForwardSquared(h, m));

    /// <summary>
    /// Symmetric transfer error ||H(p1) - p2||^2 + ||H^-1(p2) - p1||^2 (Hartley and Zisserman,
    /// Multiple View Geometry, 2nd ed., eq. 4.7), given the inverse to avoid recomputing it.
    /// </summary>
    public static double SymmetricSquared(in Transform2D h, in Transform2D inverse, in Correspondence m) =>
        ForwardSquared(h, m) + ForwardSquared(inverse, new Correspondence(m.X2, m.Y2, m.X1, m.Y1));

    /// <summary>Number of matches whose forward transfer error is at most <paramref name="threshold"/>.</summary>
    public static int Consensus(in Transform2D h, ReadOnlySpan<Correspondence> matches, double threshold)
    {
        double t2 = threshold * threshold;
        int count = 0;
        foreach (ref readonly var m in matches)
        {
            if (ForwardSquared(h, m) <= t2)
            {
                count++;
            }
        }
        return count;
    }

    /// <summary>Ascending indices of the matches within the threshold.</summary>
    public static int[] InlierIndices(in Transform2D h, ReadOnlySpan<Correspondence> matches, double threshold)
    {
        double t2 = threshold * threshold;
        var list = new List<int>();
        for (int i = 0; i < matches.Length; i++)
        {
            if (ForwardSquared(h, matches[i]) <= t2)
            {
                list.Add(i);
            }
        }
        return [.. list];
    }
}
