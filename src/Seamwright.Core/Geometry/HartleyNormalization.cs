namespace Seamwright.Core.Geometry;

/// <summary>
/// Isotropic normalisation of a point set (Hartley, "In defense of the eight-point algorithm",
/// PAMI 1997): shift the centroid to the origin and scale so the mean distance from it is sqrt(2).
/// </summary>
public readonly record struct HartleyNormalization(double CentreX, double CentreY, double Scale)
{
    /// <summary>The matrix taking original coordinates to normalised ones.</summary>
    public Transform2D Matrix => new(Scale, 0, -Scale * CentreX, 0, Scale, -Scale * CentreY, 0, 0, 1);

    /// <summary>The matrix taking normalised coordinates back to original ones.</summary>
    public Transform2D InverseMatrix => new(1 / Scale, 0, CentreX, 0, 1 / Scale, CentreY, 0, 0, 1);

    public (double X, double Y) Apply(double x, double y) => ((x - CentreX) * Scale, (y - CentreY) * Scale);

    /// <summary>Normalisations of the first and the second points of the matches.</summary>
    public static (HartleyNormalization First, HartleyNormalization Second) ForMatches(ReadOnlySpan<Correspondence> matches)
    {
        if (matches.IsEmpty)
        {
            return (new(0, 0, 1), new(0, 0, 1));
        }
        double sx1 = 0, sy1 = 0, sx2 = 0, sy2 = 0;
        foreach (var m in matches)
        {
            sx1 += m.X1; sy1 += m.Y1; sx2 += m.X2; sy2 += m.Y2;
        }
        int n = matches.Length;
        double cx1 = sx1 / n, cy1 = sy1 / n, cx2 = sx2 / n, cy2 = sy2 / n;
        double d1 = 0, d2 = 0;
        foreach (var m in matches)
        {
            d1 += Math.Sqrt((m.X1 - cx1) * (m.X1 - cx1) + (m.Y1 - cy1) * (m.Y1 - cy1));
            d2 += Math.Sqrt((m.X2 - cx2) * (m.X2 - cx2) + (m.Y2 - cy2) * (m.Y2 - cy2));
        }
        return (new(cx1, cy1, ScaleFor(d1 / n)), new(cx2, cy2, ScaleFor(d2 / n)));
    }

    private static double ScaleFor(double meanDistance) => meanDistance > 1e-12 ? Math.Sqrt(2) / meanDistance : 1.0;
}
