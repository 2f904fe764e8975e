using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;

namespace Seamwright.Pipeline.Loading;

/// <summary>What the header says about an image file, read without decoding pixels.</summary>
/// <param name="Path">The file.</param>
/// <param name="Format">Format recognised from the content.</param>
/// <param name="StoredSize">Width and height as stored.</param>
/// <param name="Orientation">EXIF orientation 1..8 (1 when absent).</param>
/// <param name="BitsPerSample">Bits per sample of the stored pixels (8 or more).</param>
public sealed record ImageHeader(string Path, ImageFileFormat Format, ImageSize StoredSize, int Orientation, int BitsPerSample)
{
    /// <summary>Size of the image as displayed (after the EXIF orientation).</summary>
    public ImageSize DisplaySize => ExifOrientation.SwapsAxes(Orientation)
        ? new ImageSize(StoredSize.Height, StoredSize.Width)
        : StoredSize;

    public bool IsHighDepth => BitsPerSample > 8;
}

/// <summary>
/// A loaded image: 8-bit gray at full resolution, upright as displayed. Coordinates of
/// <see cref="Image"/> are full-resolution pixels of the image as displayed, centres at integers.
/// </summary>
/// <param name="Header">What the header said.</param>
/// <param name="Image">The gray pixels as displayed.</param>
/// <param name="Stretch">For 16-bit sources, the input range stretched to 0..255; null for 8-bit sources.</param>
public sealed record LoadedImage(ImageHeader Header, GrayImage Image, StretchRange? Stretch)
{
    public ImageSize DisplaySize => new(Image.Width, Image.Height);

    public ImageFileFormat Format => Header.Format;
}
