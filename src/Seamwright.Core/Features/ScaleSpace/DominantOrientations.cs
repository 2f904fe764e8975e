namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// The dominant gradient directions around a keypoint (Lowe, IJCV 2004, section 5): a
/// 36-bin histogram of gradient directions weighted by magnitude and a Gaussian of 1.5 times the
/// keypoint's scale, smoothed; every peak within 80 % of the highest gives one direction,
/// interpolated by a parabola. Image coordinates: x right, y down; angles from +x towards +y.
/// </summary>
public static class DominantOrientations
{
    private const int Bins = 36;
    private const double PeakRatio = 0.8;

    public static int Find(GradientDirections directions, float x, float y, double sigma, Span<float> angles)
    {
        ArgumentNullException.ThrowIfNull(directions);
        var image = directions.Plane;
        Span<double> hist = stackalloc double[Bins];
        hist.Clear();
        int cx = (int)MathF.Round(x), cy = (int)MathF.Round(y);
        double ws = 1.5 * sigma;
        int radius = (int)Math.Round(3 * ws);
        double expScale = -1.0 / (2 * ws * ws);
        for (int i = -radius; i <= radius; i++)
        {
            for (int j = -radius; j <= radius; j++)
            {
                if (!image.IsInterior(cx + j, cy + i))
                {
                    continue;
                }
                var (dx, dy) = image.CentralGradient(cx + j, cy + i);
                double weight = Math.Exp((i * i + j * j) * expScale);
                double angle = directions.At(cx + j, cy + i, dx, dy);
                int bin = (int)Math.Round(Bins * angle / (2 * Math.PI));
                bin = ((bin % Bins) + Bins) % Bins;
                hist[bin] += weight * Math.Sqrt(dx * dx + dy * dy);
            }
        }
        Span<double> smooth = stackalloc double[Bins];
        for (int b = 0; b < Bins; b++)
        {
            smooth[b] = (hist[(b + Bins - 2) % Bins] + hist[(b + 2) % Bins]) * (1.0 / 16)
                + (hist[(b + Bins - 1) % Bins] + hist[(b + 1) % Bins]) * (4.0 / 16) + hist[b] * (6.0 / 16);
        }
        double max = 0;
        for (int b = 0; b < Bins; b++)
        {
            max = Math.Max(max, smooth[b]);
        }
        int count = 0;
        for (int b = 0; b < Bins && count < angles.Length; b++)
        {
            double left = smooth[(b + Bins - 1) % Bins], right = smooth[(b + 1) % Bins], v = smooth[b];
            if (max <= 0 || v <= left || v <= right || v < PeakRatio * max)
            {
                continue;
            }
            double offset = 0.5 * (left - right) / (left - 2 * v + right);
            double angle = 2 * Math.PI * (b + offset) / Bins;
            angles[count++] = (float)(angle > Math.PI ? angle - 2 * Math.PI : angle);
        }
        return count;
    }
}
