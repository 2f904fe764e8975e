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

    /// <summary>
    /// Total bytes of report thumbnails (JPEG): above 150 images each thumbnail shrinks with
    /// sqrt(150 / n), to no less than 48 px, and thumbnails past the budget are left out (in set
    /// order; the preview still shows those images), so a report of thousands stays a few MB.
    /// </summary>
    public long ThumbnailBudgetBytes { get; init; } = 1_000_000;

    /// <summary>The thumbnail long side for a set of <paramref name="images"/> images.</summary>
    public int ThumbnailSideFor(int images) =>
        images <= 150 ? ThumbnailLongSide : Math.Min(ThumbnailLongSide, Math.Max(48, (int)(ThumbnailLongSide * Math.Sqrt(150.0 / images))));

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
