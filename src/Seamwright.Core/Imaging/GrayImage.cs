namespace Seamwright.Core.Imaging;

/// <summary>An 8-bit gray image, row-major, stride equal to width.</summary>
public sealed class GrayImage
{
    public GrayImage(int width, int height)
        : this(width, height, new byte[checked(width * height)])
    {
    }

    public GrayImage(int width, int height, byte[] pixels)
    {
        ArgumentNullException.ThrowIfNull(pixels);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(width);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(height);
        if (pixels.Length != (long)width * height)
        {
            throw new ArgumentException($"Expected {width * (long)height} pixels, got {pixels.Length}.", nameof(pixels));
        }
        Width = width;
        Height = height;
        Pixels = pixels;
    }

    public int Width { get; }

    public int Height { get; }

    /// <summary>Row-major pixel values.</summary>
    public byte[] Pixels { get; }

    public Span<byte> Row(int y) => Pixels.AsSpan(y * Width, Width);

    public byte this[int x, int y]
    {
        get => Pixels[y * Width + x];
        set => Pixels[y * Width + x] = value;
    }
}
