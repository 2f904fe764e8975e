namespace Seamwright.Core.Geometry;

/// <summary>
/// Affine map (6 degrees of freedom) by least squares on centred coordinates: two independent
/// 2x2 normal systems after removing the centroids. Exact for three non-collinear matches.
/// </summary>
public static class AffineSolver
{
    public const int MinimalSampleSize = 3;

    public static bool TryFit(ReadOnlySpan<Correspondence> data, out Transform2D model)
    {
        model = default;
        if (data.Length < MinimalSampleSize)
        {
            return false;
        }
        double cx1 = 0, cy1 = 0, cx2 = 0, cy2 = 0;
        foreach (var m in data)
        {
            cx1 += m.X1; cy1 += m.Y1; cx2 += m.X2; cy2 += m.Y2;
        }
        int n = data.Length;
        cx1 /= n; cy1 /= n; cx2 /= n; cy2 /= n;
        double sxx = 0, sxy = 0, syy = 0, sxu = 0, syu = 0, sxv = 0, syv = 0;
        foreach (var m in data)
        {
            double x = m.X1 - cx1, y = m.Y1 - cy1, u = m.X2 - cx2, v = m.Y2 - cy2;
            sxx += x * x; sxy += x * y; syy += y * y;
            sxu += x * u; syu += y * u; sxv += x * v; syv += y * v;
        }
        double det = sxx * syy - sxy * sxy;
        // Relative test: a (near) collinear point set has a vanishing second moment determinant.
        if (!(det > 1e-12 * (sxx + syy) * (sxx + syy)))
        {
            return false;
        }
        double a11 = (sxu * syy - syu * sxy) / det, a12 = (syu * sxx - sxu * sxy) / det;
        double a21 = (sxv * syy - syv * sxy) / det, a22 = (syv * sxx - sxv * sxy) / det;
        model = new Transform2D(a11, a12, cx2 - a11 * cx1 - a12 * cy1, a21, a22, cy2 - a21 * cx1 - a22 * cy1, 0, 0, 1);
        return model.IsFinite;
    }
}
