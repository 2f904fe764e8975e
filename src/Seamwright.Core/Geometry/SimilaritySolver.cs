namespace Seamwright.Core.Geometry;

/// <summary>
/// Similarity (rotation, uniform scale, shift; 4 degrees of freedom) in closed form on centred
/// coordinates (the least-squares solution of Umeyama, PAMI 1991, without reflection). Exact for two
/// distinct matches.
/// </summary>
public static class SimilaritySolver
{
    public const int MinimalSampleSize = 2;

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
        double sxx = 0, dot = 0, cross = 0;
        foreach (var m in data)
        {
            double x = m.X1 - cx1, y = m.Y1 - cy1, u = m.X2 - cx2, v = m.Y2 - cy2;
            sxx += x * x + y * y;
            dot += x * u + y * v;
            cross += x * v - y * u;
        }
        if (!(sxx > 1e-18))
        {
            return false;
        }
        double a = dot / sxx, b = cross / sxx;
        // u = a x - b y + tx ; v = b x + a y + ty, with the centroids mapped onto each other.
        model = new Transform2D(a, -b, cx2 - a * cx1 + b * cy1, b, a, cy2 - b * cx1 - a * cy1, 0, 0, 1);
        return model.IsFinite && (a != 0 || b != 0);
    }
}
