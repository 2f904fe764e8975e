using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// The true (round-disc) consensus: matches whose forward transfer error ||H(p) - q|| is at most
/// the threshold in pixels of the second image, with the point in front (w &gt; 0).
/// </summary>
internal static class DiscConsensus
{
    public static int Count(ReadOnlySpan<Correspondence> matches, in Transform2D transform, double threshold)
    {
        int count = 0;
        double t2 = threshold * threshold;
        foreach (var m in matches)
        {
            if (IsInlier(m, transform, t2))
            {
                count++;
            }
        }
        return count;
    }

    /// <summary>Squared forward transfer error, +infinity when the point is behind or cannot be mapped.</summary>
    public static double SquaredError(in Correspondence m, in Transform2D transform)
    {
        if (!(transform.W(m.X1, m.Y1) > 0) || !transform.TryApply(m.X1, m.Y1, out double u, out double v))
        {
            return double.PositiveInfinity;
        }
        double du = u - m.X2, dv = v - m.Y2;
        return du * du + dv * dv;
    }

    private static bool IsInlier(in Correspondence m, in Transform2D transform, double squaredThreshold) =>
        SquaredError(m, transform) <= squaredThreshold;
}
