namespace Seamwright.Core.Geometry;

/// <summary>Bounds a usable pairwise transform must respect over the region of the first image it is judged on.</summary>
/// <param name="MaxScale">
/// Largest local stretch or shrink (singular value of the local Jacobian, or its inverse) at the
/// rectangle's corners. Default 20 (judgement): the homogr set reaches about 11 at a far corner of a
/// receding facade; wrong models from chance samples usually go far beyond or put a corner behind.
/// </param>
/// <param name="MaxPerspectiveRatio">
/// Largest ratio of the homogeneous denominators w over the rectangle's corners (1 for an affine
/// map). Default 20 (judgement, as for the scale).
/// </param>
public sealed record SanityLimits(double MaxScale = 20, double MaxPerspectiveRatio = 20);

/// <summary>
/// Sanity checks for an estimated transform over a convex region given by its corners (the whole
/// rectangle, or the overlap of a pair, <see cref="OverlapRegion"/>): finite entries, every corner
/// in front (w &gt; 0; w is linear, so the whole region is), orientation kept (positive Jacobian
/// determinant; a mirror image is never a valid overlap), bounded scale and perspective.
/// </summary>
public static class TransformSanity
{
    /// <summary>Checks over the whole rectangle; null when the transform passes, otherwise the first problem in words.</summary>
    public static string? FindProblem(in Transform2D h, ImageSize rectangle, SanityLimits limits) =>
        FindProblem(h, Transform2D.Corners(Math.Max(rectangle.Width, 1), Math.Max(rectangle.Height, 1)), limits, "image");

    /// <summary>
    /// Checks over the convex region with the given corners (<paramref name="regionName"/> names
    /// it in the messages); null when the transform passes, otherwise the first problem in words.
    /// </summary>
    public static string? FindProblem(in Transform2D h, ReadOnlySpan<(double X, double Y)> corners, SanityLimits limits, string regionName)
    {
        ArgumentNullException.ThrowIfNull(limits);
        if (!h.IsFinite)
        {
            return "the transform has non-finite entries";
        }
        double wMin = double.PositiveInfinity, wMax = 0;
        foreach (var (x, y) in corners)
        {
            double w = h.W(x, y);
            if (!(w > 0))
            {
                return $"part of the first {regionName} maps behind the viewer (w <= 0 at a corner)";
            }
            wMin = Math.Min(wMin, w);
            wMax = Math.Max(wMax, w);
        }
        foreach (var (x, y) in corners)
        {
            var (s1, s2, det) = LocalStretch(h, x, y);
            if (!(det > 0))
            {
                return "the transform mirrors the image (orientation not kept)";
            }
            if (s1 > limits.MaxScale || s2 < 1 / limits.MaxScale)
            {
                return FormattableString.Invariant($"local scale {s2:0.###}..{s1:0.###} outside 1/{limits.MaxScale}..{limits.MaxScale}");
            }
        }
        if (wMax / wMin > limits.MaxPerspectiveRatio)
        {
            return FormattableString.Invariant($"perspective ratio {wMax / wMin:0.##} over the first {regionName} exceeds {limits.MaxPerspectiveRatio}");
        }
        return null;
    }

    /// <summary>Singular values (largest, smallest) and determinant of the Jacobian of h at (x, y).</summary>
    public static (double Largest, double Smallest, double Determinant) LocalStretch(in Transform2D h, double x, double y)
    {
        double w = h.W(x, y);
        double u = (h.M11 * x + h.M12 * y + h.M13) / w;
        double v = (h.M21 * x + h.M22 * y + h.M23) / w;
        double j11 = (h.M11 - u * h.M31) / w, j12 = (h.M12 - u * h.M32) / w;
        double j21 = (h.M21 - v * h.M31) / w, j22 = (h.M22 - v * h.M32) / w;
        double det = j11 * j22 - j12 * j21;
        double f = j11 * j11 + j12 * j12 + j21 * j21 + j22 * j22;
        double disc = Math.Sqrt(Math.Max(0, f * f - 4 * det * det));
        double l1 = Math.Sqrt(Math.Max(0, (f + disc) / 2)), l2 = Math.Sqrt(Math.Max(0, (f - disc) / 2));
        return (l1, l2, det);
    }
}
