using Seamwright.Core.Geometry;

namespace Seamwright.Core.Imaging;

/// <summary>Warps a gray image by a transform: inverse mapping with bilinear sampling.</summary>
public static class ImageWarper
{
    /// <summary>
    /// Renders a <paramref name="width"/> x <paramref name="height"/> image whose pixel q shows the
    /// source at <c>sourceToTarget^-1(q)</c>. Points that fall outside the source, or behind the
    /// transform (w &lt;= 0), get <paramref name="fill"/>. Within half a pixel of the border the
    /// edge is replicated, so a pure resampling keeps the full frame.
    /// </summary>
    public static GrayImage Warp(GrayImage source, in Transform2D sourceToTarget, int width, int height, byte fill = 0) =>
        Warp(source, sourceToTarget, width, height, fill, validMask: null);

    /// <summary>As <see cref="Warp(GrayImage, in Transform2D, int, int, byte)"/>, also marking valid pixels (255) in a mask.</summary>
    public static GrayImage Warp(GrayImage source, in Transform2D sourceToTarget, int width, int height, byte fill, GrayImage? validMask)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(width);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(height);
        if (validMask is not null && (validMask.Width != width || validMask.Height != height))
        {
            throw new ArgumentException("The mask must have the output size.", nameof(validMask));
        }
        var inv = sourceToTarget.Inverse();
        var result = new GrayImage(width, height);
        double maxX = source.Width - 0.5;
        double maxY = source.Height - 0.5;
        for (int v = 0; v < height; v++)
        {
            Span<byte> dst = result.Row(v);
            Span<byte> mask = validMask is null ? default : validMask.Row(v);
            for (int u = 0; u < width; u++)
            {
                double w = inv.M31 * u + inv.M32 * v + inv.M33;
                bool ok = false;
                if (w > 0)
                {
                    double x = (inv.M11 * u + inv.M12 * v + inv.M13) / w;
                    double y = (inv.M21 * u + inv.M22 * v + inv.M23) / w;
                    if (x >= -0.5 && y >= -0.5 && x < maxX && y < maxY)
                    {
                        dst[u] = AreaResampler.ToByte(BilinearSampler.SampleClamped(source, x, y));
                        ok = true;
                    }
                }
                if (!ok)
                {
                    dst[u] = fill;
                }
                if (validMask is not null)
                {
                    mask[u] = ok ? (byte)255 : (byte)0;
                }
            }
        }
        return result;
    }
}
