namespace Seamwright.Core.Estimation;

/// <summary>
/// The standard sampling bound (Fischler and Bolles, CACM 1981; Hartley and Zisserman, Multiple
/// View Geometry, 2nd ed., eq. 4.18): N = log(1 - p) / log(1 - (1 - e)^s) samples give
/// probability p of drawing at least one all-inlier sample of size s at outlier ratio e.
/// </summary>
public static class TerminationBound
{
    /// <summary>Samples needed, rounded up and clamped to [0, cap].</summary>
    public static int Samples(double confidence, double inlierRatio, int sampleSize, int cap)
    {
        if (inlierRatio >= 1)
        {
            return Math.Min(1, cap);
        }
        if (inlierRatio <= 0)
        {
            return cap;
        }
        double good = Math.Pow(inlierRatio, sampleSize);
        double denominator = Math.Log(1 - good);
        if (!(denominator < 0))
        {
            return cap;
        }
        double n = Math.Ceiling(Math.Log(1 - confidence) / denominator);
        return n >= cap ? cap : (int)Math.Max(n, 0);
    }
}
