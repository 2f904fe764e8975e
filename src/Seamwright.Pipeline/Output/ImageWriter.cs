using Seamwright.Core.Imaging;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Formats.Jpeg;
using SixLabors.ImageSharp.Formats.Png;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Output;

/// <summary>Writes gray images as PNG or JPEG, atomically (<see cref="AtomicFile"/>). Output bytes are deterministic.</summary>
public static class ImageWriter
{
    /// <summary>Lossless 8-bit gray PNG.</summary>
    public static void WritePng(string path, GrayImage image) =>
        AtomicFile.Write(path, stream => EncodePng(image, stream));

    /// <summary>Gray (single-channel) JPEG at the given quality (1..100).</summary>
    public static void WriteJpeg(string path, GrayImage image, int quality = 90)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(quality, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(quality, 100);
        AtomicFile.Write(path, stream => EncodeJpeg(image, stream, quality));
    }

    /// <summary>Chooses PNG or JPEG by the extension (.png, .jpg, .jpeg).</summary>
    public static void Write(string path, GrayImage image, int jpegQuality = 90)
    {
        string ext = Path.GetExtension(path).ToUpperInvariant();
        switch (ext)
        {
            case ".PNG":
                WritePng(path, image);
                break;
            case ".JPG" or ".JPEG":
                WriteJpeg(path, image, jpegQuality);
                break;
            default:
                throw new ArgumentException($"Cannot tell the image format from the extension '{ext}' (use .png, .jpg or .jpeg).", nameof(path));
        }
    }

    public static void EncodePng(GrayImage image, Stream stream)
    {
        using var img = ToImage(image);
        img.SaveAsPng(stream, new PngEncoder { ColorType = PngColorType.Grayscale, BitDepth = PngBitDepth.Bit8 });
    }

    public static void EncodeJpeg(GrayImage image, Stream stream, int quality)
    {
        using var img = ToImage(image);
        img.SaveAsJpeg(stream, new JpegEncoder { Quality = quality, ColorType = JpegColorType.Luminance });
    }

    private static Image<L8> ToImage(GrayImage image)
    {
        ArgumentNullException.ThrowIfNull(image);
        return Image.LoadPixelData<L8>(image.Pixels, image.Width, image.Height);
    }
}
