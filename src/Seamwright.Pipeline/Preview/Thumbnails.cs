using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Pipeline.Preview;

/// <summary>Small JPEG thumbnails for the report.</summary>
public static class Thumbnails
{
    /// <summary>A copy scaled to fit the long side (never enlarged), as JPEG bytes.</summary>
    public static byte[] Jpeg(Image<Rgb24> image, int longSide, int quality = 80)
    {
        ArgumentNullException.ThrowIfNull(image);
        double s = Math.Min(1.0, (double)longSide / Math.Max(image.Width, image.Height));
        int w = Math.Max(1, (int)Math.Round(image.Width * s)), h = Math.Max(1, (int)Math.Round(image.Height * s));
        using var small = image.Clone(x => x.Resize(w, h));
        return PreviewRenderer.EncodeJpeg(small, quality);
    }
}
