namespace Seamwright.Core.Geometry;

/// <summary>
/// A planar projective transform as a 3x3 matrix (row-major). It maps a point (x, y) to
/// ((m11 x + m12 y + m13) / w, (m21 x + m22 y + m23) / w) with w = m31 x + m32 y + m33.
/// Pixel centres are at integer coordinates throughout Seamwright.
/// </summary>
public readonly record struct Transform2D(
    double M11, double M12, double M13,
    double M21, double M22, double M23,
    double M31, double M32, double M33)
{
    public static Transform2D Identity => new(1, 0, 0, 0, 1, 0, 0, 0, 1);

    public static Transform2D Translation(double tx, double ty) => new(1, 0, tx, 0, 1, ty, 0, 0, 1);

    public static Transform2D Scaling(double sx, double sy) => new(sx, 0, 0, 0, sy, 0, 0, 0, 1);

    /// <summary>Builds a transform from 9 row-major values.</summary>
    public static Transform2D FromRowMajor(ReadOnlySpan<double> m)
    {
        if (m.Length != 9)
        {
            throw new ArgumentException("A 3x3 transform needs 9 values.", nameof(m));
        }
        return new(m[0], m[1], m[2], m[3], m[4], m[5], m[6], m[7], m[8]);
    }

    public double[] ToRowMajor() => [M11, M12, M13, M21, M22, M23, M31, M32, M33];

    /// <summary>Rows as arrays, the JSON shape of our outputs.</summary>
    public double[][] ToRows() => [[M11, M12, M13], [M21, M22, M23], [M31, M32, M33]];

    public static Transform2D FromRows(double[][] rows)
    {
        ArgumentNullException.ThrowIfNull(rows);
        if (rows.Length != 3 || rows.Any(r => r is null || r.Length != 3))
        {
            throw new ArgumentException("A 3x3 transform needs 3 rows of 3 values.", nameof(rows));
        }
        return new(rows[0][0], rows[0][1], rows[0][2], rows[1][0], rows[1][1], rows[1][2], rows[2][0], rows[2][1], rows[2][2]);
    }

    public bool IsFinite =>
        double.IsFinite(M11) && double.IsFinite(M12) && double.IsFinite(M13) &&
        double.IsFinite(M21) && double.IsFinite(M22) && double.IsFinite(M23) &&
        double.IsFinite(M31) && double.IsFinite(M32) && double.IsFinite(M33);

    /// <summary>The homogeneous denominator at (x, y); positive means the point stays in front.</summary>
    public double W(double x, double y) => M31 * x + M32 * y + M33;

    /// <summary>Maps a point; returns false when w is zero or not finite.</summary>
    public bool TryApply(double x, double y, out double u, out double v)
    {
        double w = M31 * x + M32 * y + M33;
        if (w == 0 || !double.IsFinite(w))
        {
            u = v = double.NaN;
            return false;
        }
        u = (M11 * x + M12 * y + M13) / w;
        v = (M21 * x + M22 * y + M23) / w;
        return double.IsFinite(u) && double.IsFinite(v);
    }

    /// <summary>Maps a point (NaN when it cannot be mapped).</summary>
    public (double X, double Y) Apply(double x, double y)
    {
        TryApply(x, y, out double u, out double v);
        return (u, v);
    }

    /// <summary>this * other: applies <paramref name="other"/> first, then this.</summary>
    public Transform2D Multiply(in Transform2D o) => new(
        M11 * o.M11 + M12 * o.M21 + M13 * o.M31, M11 * o.M12 + M12 * o.M22 + M13 * o.M32, M11 * o.M13 + M12 * o.M23 + M13 * o.M33,
        M21 * o.M11 + M22 * o.M21 + M23 * o.M31, M21 * o.M12 + M22 * o.M22 + M23 * o.M32, M21 * o.M13 + M22 * o.M23 + M23 * o.M33,
        M31 * o.M11 + M32 * o.M21 + M33 * o.M31, M31 * o.M12 + M32 * o.M22 + M33 * o.M32, M31 * o.M13 + M32 * o.M23 + M33 * o.M33);

    public static Transform2D operator *(in Transform2D a, in Transform2D b) => a.Multiply(b);

    public double Determinant =>
        M11 * (M22 * M33 - M23 * M32) - M12 * (M21 * M33 - M23 * M31) + M13 * (M21 * M32 - M22 * M31);

    /// <summary>The inverse (adjugate / determinant), scaled so that m33 = 1 where possible.</summary>
    public bool TryInvert(out Transform2D inverse)
    {
        double det = Determinant;
        if (det == 0 || !double.IsFinite(det))
        {
            inverse = default;
            return false;
        }
        var adj = new Transform2D(
            M22 * M33 - M23 * M32, M13 * M32 - M12 * M33, M12 * M23 - M13 * M22,
            M23 * M31 - M21 * M33, M11 * M33 - M13 * M31, M13 * M21 - M11 * M23,
            M21 * M32 - M22 * M31, M12 * M31 - M11 * M32, M11 * M22 - M12 * M21);
        inverse = adj.Scale(1.0 / det).Normalized();
        return inverse.IsFinite;
    }

    public Transform2D Inverse() =>
        TryInvert(out var inv) ? inv : throw new InvalidOperationException("The transform is singular.");

    public Transform2D Scale(double s) => new(M11 * s, M12 * s, M13 * s, M21 * s, M22 * s, M23 * s, M31 * s, M32 * s, M33 * s);

    /// <summary>Scaled so that m33 = 1 (unchanged when m33 is zero or tiny).</summary>
    public Transform2D Normalized() => Math.Abs(M33) > 1e-300 ? Scale(1.0 / M33) : this;

    /// <summary>Largest distance between the images of the given points under two transforms.</summary>
    public static double MaxPointDistance(in Transform2D a, in Transform2D b, ReadOnlySpan<(double X, double Y)> points)
    {
        double worst = 0;
        foreach (var (x, y) in points)
        {
            var (ax, ay) = a.Apply(x, y);
            var (bx, by) = b.Apply(x, y);
            double d = Math.Sqrt((ax - bx) * (ax - bx) + (ay - by) * (ay - by));
            if (!double.IsFinite(d))
            {
                return double.PositiveInfinity;
            }
            worst = Math.Max(worst, d);
        }
        return worst;
    }

    /// <summary>The four corners of a width x height image (pixel centres at integers).</summary>
    public static (double X, double Y)[] Corners(double width, double height) =>
        [(0, 0), (width - 1, 0), (width - 1, height - 1), (0, height - 1)];
}
