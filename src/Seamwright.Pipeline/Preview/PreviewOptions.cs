namespace Seamwright.Pipeline.Preview;

/// <summary>Settings of the preview mosaic.</summary>
public sealed record PreviewOptions
{
    /// <summary>Longest side of the preview canvas in pixels (the mosaic is scaled down to fit).</summary>
    public int MaxLongSide { get; init; } = 1600;

    /// <summary>JPEG quality, 1..100.</summary>
    public int JpegQuality { get; init; } = 85;

    /// <summary>Longest side of a report thumbnail in pixels.</summary>
    public int ThumbnailLongSide { get; init; } = 160;

    public void Validate()
    {
        if (MaxLongSide < 16 || MaxLongSide > 16384)
        {
            throw new ArgumentOutOfRangeException(nameof(MaxLongSide), "Preview setting MaxLongSide must be 16..16384 px.");
        }
        if (JpegQuality < 1 || JpegQuality > 100)
        {
            throw new ArgumentOutOfRangeException(nameof(JpegQuality), "Preview setting JpegQuality must be 1..100.");
        }
        if (ThumbnailLongSide < 8 || ThumbnailLongSide > 1024)
        {
            throw new ArgumentOutOfRangeException(nameof(ThumbnailLongSide), "Preview setting ThumbnailLongSide must be 8..1024 px.");
        }
    }
}
