namespace Seamwright.Core.Geometry;

/// <summary>Size of an image in pixels (of the image as displayed, at full resolution).</summary>
public readonly record struct ImageSize(int Width, int Height)
{
    public long PixelCount => (long)Width * Height;

    public override string ToString() => $"{Width}x{Height}";
}
