namespace Seamwright.Core.Imaging;

/// <summary>
/// Bilinear interpolation with pixel centres at integer coordinates: the image is defined on
/// [0, width - 1] x [0, height - 1]; <see cref="SampleClamped"/> extends it by edge replication.
/// </summary>
public static class BilinearSampler
{
    /// <summary>Samples at (x, y); false when the point lies outside the pixel-centre hull or is not finite.</summary>
    public static bool TrySample(GrayImage image, double x, double y, out float value)
    {
        ArgumentNullException.ThrowIfNull(image);
        if (!(x >= 0 && y >= 0 && x <= image.Width - 1 && y <= image.Height - 1))
        {
            value = 0;
            return false;
        }
        value = SampleInside(image, x, y);
        return true;
    }

    /// <summary>Samples at (x, y) with coordinates clamped to the image; NaN input gives NaN.</summary>
    public static float SampleClamped(GrayImage image, double x, double y)
    {
        ArgumentNullException.ThrowIfNull(image);
        if (double.IsNaN(x) || double.IsNaN(y))
        {
            return float.NaN;
        }
        x = Math.Clamp(x, 0, image.Width - 1);
        y = Math.Clamp(y, 0, image.Height - 1);
        return SampleInside(image, x, y);
    }

    private static float SampleInside(GrayImage image, double x, double y)
    {
        int x0 = (int)x;
        int y0 = (int)y;
        int x1 = Math.Min(x0 + 1, image.Width - 1);
        int y1 = Math.Min(y0 + 1, image.Height - 1);
        float fx = (float)(x - x0);
        float fy = (float)(y - y0);
        byte[] p = image.Pixels;
        int w = image.Width;
        float top = p[y0 * w + x0] + fx * (p[y0 * w + x1] - p[y0 * w + x0]);
        float bottom = p[y1 * w + x0] + fx * (p[y1 * w + x1] - p[y1 * w + x0]);
        return top + fy * (bottom - top);
    }
}
