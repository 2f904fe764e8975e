using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// Rejects minimal samples that cannot give a usable model before any solver runs.
/// </summary>
public static class SampleDegeneracy
{
    /// <summary>
    /// Relative collinearity tolerance: a triple is collinear when its doubled triangle area is below
    /// this fraction of the squared longest side (judgement: about 0.06 degrees of angle).
    /// </summary>
    public const double CollinearityTolerance = 1e-3;

    /// <summary>True when two sample points coincide (within 1e-6 px) in either image.</summary>
    public static bool HasRepeatedPoint(ReadOnlySpan<Correspondence> sample)
    {
        for (int i = 0; i < sample.Length; i++)
        {
            for (int j = i + 1; j < sample.Length; j++)
            {
                if (Near(sample[i].X1, sample[i].Y1, sample[j].X1, sample[j].Y1) || Near(sample[i].X2, sample[i].Y2, sample[j].X2, sample[j].Y2))
                {
                    return true;
                }
            }
        }
        return false;
    }

    /// <summary>True when any three sample points are (nearly) collinear in either image.</summary>
    public static bool HasCollinearTriple(ReadOnlySpan<Correspondence> sample)
    {
        for (int i = 0; i < sample.Length; i++)
        {
            for (int j = i + 1; j < sample.Length; j++)
            {
                for (int k = j + 1; k < sample.Length; k++)
                {
                    if (Collinear(sample[i].X1, sample[i].Y1, sample[j].X1, sample[j].Y1, sample[k].X1, sample[k].Y1) ||
                        Collinear(sample[i].X2, sample[i].Y2, sample[j].X2, sample[j].Y2, sample[k].X2, sample[k].Y2))
                    {
                        return true;
                    }
                }
            }
        }
        return false;
    }

    /// <summary>
    /// Orientation consistency: an orientation-keeping map in front of the viewer preserves the
    /// turning direction of every triple, so a triple turning left in one image and right in the
    /// other rules the sample out (a mirror image or a mixed-up sample).
    /// </summary>
    public static bool HasOrientationFlip(ReadOnlySpan<Correspondence> sample)
    {
        for (int i = 0; i < sample.Length; i++)
        {
            for (int j = i + 1; j < sample.Length; j++)
            {
                for (int k = j + 1; k < sample.Length; k++)
                {
                    double a = Cross(sample[i].X1, sample[i].Y1, sample[j].X1, sample[j].Y1, sample[k].X1, sample[k].Y1);
                    double b = Cross(sample[i].X2, sample[i].Y2, sample[j].X2, sample[j].Y2, sample[k].X2, sample[k].Y2);
                    if (a * b < 0)
                    {
                        return true;
                    }
                }
            }
        }
        return false;
    }

    private static bool Near(double x1, double y1, double x2, double y2) => Math.Abs(x1 - x2) < 1e-6 && Math.Abs(y1 - y2) < 1e-6;

    private static double Cross(double ax, double ay, double bx, double by, double cx, double cy) =>
        (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);

    private static bool Collinear(double ax, double ay, double bx, double by, double cx, double cy)
    {
        double area2 = Math.Abs(Cross(ax, ay, bx, by, cx, cy));
        double l1 = (bx - ax) * (bx - ax) + (by - ay) * (by - ay);
        double l2 = (cx - ax) * (cx - ax) + (cy - ay) * (cy - ay);
        double l3 = (cx - bx) * (cx - bx) + (cy - by) * (cy - by);
        return area2 <= CollinearityTolerance * Math.Max(l1, Math.Max(l2, l3));
    }
}
