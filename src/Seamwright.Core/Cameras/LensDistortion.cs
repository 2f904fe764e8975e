namespace Seamwright.Core.Cameras;

/// <summary>
/// Radial lens distortion, Brown's polynomial (Brown, "Decentering distortion of lenses",
/// Photogrammetric Engineering 1966) with two terms: a point (x, y) of the ideal image in focal
/// units, x = (u - cx) / f, is seen at (x, y) (1 + k1 r^2 + k2 r^4), r^2 = x^2 + y^2. Negative k1
/// is barrel distortion.
/// </summary>
public readonly record struct LensDistortion(double K1, double K2)
{
    public static LensDistortion None => new(0, 0);

    public bool IsNone => K1 == 0 && K2 == 0;

    /// <summary>Factor 1 + k1 r^2 + k2 r^4 for an ideal point at squared radius r2.</summary>
    public double Factor(double r2) => 1 + r2 * (K1 + K2 * r2);

    /// <summary>
    /// Squared ideal radius where the seen radius r (1 + k1 r^2 + k2 r^4) stops growing (its
    /// derivative 1 + 3 k1 r^2 + 5 k2 r^4 reaches zero); infinity when it grows everywhere. Beyond
    /// it the polynomial folds back: rays far outside the field would be drawn inside the image.
    /// </summary>
    public double MonotoneRadiusSquared
    {
        get
        {
            // Smallest positive root s of 5 k2 s^2 + 3 k1 s + 1 = 0.
            double a = 5 * K2, b = 3 * K1;
            if (a == 0)
            {
                return b < 0 ? -1 / b : double.PositiveInfinity;
            }
            double disc = b * b - 4 * a;
            if (disc < 0)
            {
                return double.PositiveInfinity;
            }
            double sq = Math.Sqrt(disc);
            double low = Math.Min((-b - sq) / (2 * a), (-b + sq) / (2 * a)), high = Math.Max((-b - sq) / (2 * a), (-b + sq) / (2 * a));
            return low > 0 ? low : high > 0 ? high : double.PositiveInfinity;
        }
    }

    /// <summary>Seen point of an ideal one (focal units).</summary>
    public (double X, double Y) Distort(double x, double y)
    {
        double f = Factor(x * x + y * y);
        return (x * f, y * f);
    }

    /// <summary>
    /// Ideal point of a seen one (focal units): Newton's method on the radius, r_d = r (1 + k1 r^2 +
    /// k2 r^4), from r = r_d; stops where the derivative would turn (outside the monotone range the
    /// seen radius is kept at the last valid estimate).
    /// </summary>
    public (double X, double Y) Undistort(double xd, double yd)
    {
        if (IsNone)
        {
            return (xd, yd);
        }
        double rd = Math.Sqrt(xd * xd + yd * yd);
        if (rd == 0)
        {
            return (0, 0);
        }
        double r = rd;
        for (int i = 0; i < 20; i++)
        {
            double r2 = r * r;
            double g = r * Factor(r2) - rd;
            double dg = 1 + 3 * K1 * r2 + 5 * K2 * r2 * r2;
            if (!(dg > 1e-6))
            {
                break;
            }
            double next = r - g / dg;
            if (!(next > 0))
            {
                break;
            }
            bool done = Math.Abs(next - r) <= 1e-15 * Math.Max(1, r);
            r = next;
            if (done)
            {
                break;
            }
        }
        double s = r / rd;
        return (xd * s, yd * s);
    }
}
