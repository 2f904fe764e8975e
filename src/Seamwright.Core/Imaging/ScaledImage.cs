using Seamwright.Core.Geometry;

namespace Seamwright.Core.Imaging;

/// <summary>
/// An image resampled from a larger one by the factor <see cref="Scale"/> (source pixels per
/// pixel of <see cref="Image"/>; 1 means the very same image). Pixel centres are at integer
/// coordinates and pixel i covers [i - 0.5, i + 0.5), so a working pixel x covers the source
/// interval [x s, (x + 1) s) measured from the source's left edge, and
/// <c>x_source = (x_work + 0.5) s - 0.5</c> (the same for y).
/// </summary>
public sealed record ScaledImage(GrayImage Image, double Scale)
{
    /// <summary>Maps a coordinate of <see cref="Image"/> to the source image.</summary>
    public double ToSource(double work) => ToSource(work, Scale);

    /// <summary>Maps a coordinate of the source image to <see cref="Image"/>.</summary>
    public double ToWork(double source) => ToWork(source, Scale);

    /// <summary>The transform from this image's pixels to the source image's pixels.</summary>
    public Transform2D WorkToSource => WorkToSourceTransform(Scale);

    public static double ToSource(double work, double scale) => (work + 0.5) * scale - 0.5;

    public static double ToWork(double source, double scale) => (source + 0.5) / scale - 0.5;

    public static Transform2D WorkToSourceTransform(double scale)
    {
        double offset = 0.5 * scale - 0.5;
        return new Transform2D(scale, 0, offset, 0, scale, offset, 0, 0, 1);
    }
}
