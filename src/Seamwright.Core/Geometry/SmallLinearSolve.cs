namespace Seamwright.Core.Geometry;

/// <summary>
/// Gaussian elimination with partial pivoting for the tiny dense systems of the minimal and
/// closed-form solvers (up to 8 unknowns). Allocation-free: works in place on caller spans.
/// </summary>
internal static class SmallLinearSolve
{
    /// <summary>
    /// Solves A x = b in place (A is n x n row-major, b becomes x). Returns false when a pivot is
    /// below <paramref name="relativePivotTolerance"/> times the largest absolute entry of A.
    /// </summary>
    public static bool TrySolve(Span<double> a, Span<double> b, int n, double relativePivotTolerance = 1e-12)
    {
        double scale = 0;
        for (int i = 0; i < n * n; i++)
        {
            scale = Math.Max(scale, Math.Abs(a[i]));
        }
        if (!(scale > 0) || !double.IsFinite(scale))
        {
            return false;
        }
        double tol = scale * relativePivotTolerance;
        for (int col = 0; col < n; col++)
        {
            int pivot = col;
            double best = Math.Abs(a[col * n + col]);
            for (int r = col + 1; r < n; r++)
            {
                double v = Math.Abs(a[r * n + col]);
                if (v > best)
                {
                    best = v;
                    pivot = r;
                }
            }
            if (!(best > tol))
            {
                return false;
            }
            if (pivot != col)
            {
                for (int c = 0; c < n; c++)
                {
                    (a[col * n + c], a[pivot * n + c]) = (a[pivot * n + c], a[col * n + c]);
                }
                (b[col], b[pivot]) = (b[pivot], b[col]);
            }
            double inv = 1.0 / a[col * n + col];
            for (int r = col + 1; r < n; r++)
            {
                double f = a[r * n + col] * inv;
                if (f == 0)
                {
                    continue;
                }
                for (int c = col; c < n; c++)
                {
                    a[r * n + c] -= f * a[col * n + c];
                }
                b[r] -= f * b[col];
            }
        }
        for (int r = n - 1; r >= 0; r--)
        {
            double s = b[r];
            for (int c = r + 1; c < n; c++)
            {
                s -= a[r * n + c] * b[c];
            }
            b[r] = s / a[r * n + r];
        }
        for (int i = 0; i < n; i++)
        {
            if (!double.IsFinite(b[i]))
            {
                return false;
            }
        }
        return true;
    }
}
