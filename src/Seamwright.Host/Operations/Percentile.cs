namespace Seamwright.Host.Operations;

/// <summary>Sample quantiles by linear interpolation between order statistics (Hyndman and Fan, 1996, definition 7).</summary>
internal static class Percentile
{
    /// <summary>The p-th quantile (0..1) of the values; null when there are none.</summary>
    public static double? Of(IReadOnlyCollection<double> values, double p)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(p, 0);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(p, 1);
        if (values.Count == 0)
        {
            return null;
        }
        var sorted = values.Order().ToArray();
        double h = (sorted.Length - 1) * p;
        int lo = (int)Math.Floor(h);
        int hi = Math.Min(lo + 1, sorted.Length - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }
}
