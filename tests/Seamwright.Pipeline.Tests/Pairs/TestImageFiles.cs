using Seamwright.Core.Imaging;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Tests.Pairs;

/// <summary>Plain gray decoding of trusted test files (the limits of the production loader are tested elsewhere).</summary>
internal static class TestImageFiles
{
    public static GrayImage LoadGray(string path)
    {
        using var image = Image.Load<L8>(path);
        var gray = new GrayImage(image.Width, image.Height);
        image.CopyPixelDataTo(gray.Pixels);
        return gray;
    }
}
