namespace Seamwright.Pipeline.Loading;

/// <summary>
/// Limits and conversion settings for loading images. Every limit is checked before the
/// decoder allocates pixel memory, except the allocation limit and the timeout, which guard the
/// decode itself.
/// </summary>
public sealed record LoadLimits
{
    /// <summary>Every format the loader knows.</summary>
    public static readonly IReadOnlyList<ImageFileFormat> AllFormats =
        [ImageFileFormat.Jpeg, ImageFileFormat.Png, ImageFileFormat.Tiff, ImageFileFormat.Bmp, ImageFileFormat.Webp];

    /// <summary>Largest file accepted, in bytes. Default 1 GiB (a 250 MP uncompressed 16-bit gray TIFF is 500 MB).</summary>
    public long MaxFileBytes { get; init; } = 1L << 30;

    /// <summary>Largest pixel count (width x height from the header) accepted. Default 250 million (a 100+ MP scan fits with room).</summary>
    public long MaxPixels { get; init; } = 250_000_000;

    /// <summary>
    /// Largest single buffer the image decoder may allocate, in megabytes (ImageSharp
    /// <c>MemoryAllocatorOptions.AllocationLimitMegabytes</c>). Default 1024: a 250 MP 16-bit
    /// gray image needs 500 MB, and decoders keep colour planes of similar size.
    /// </summary>
    public int AllocationLimitMegabytes { get; init; } = 1024;

    /// <summary>Formats accepted (by content signature). Default: JPEG, PNG, TIFF, BMP, WebP.</summary>
    public IReadOnlyList<ImageFileFormat> Formats { get; init; } = AllFormats;

    /// <summary>
    /// Wall-clock limit for one decode. Default 120 s, far above a normal decode (a 100 MP JPEG
    /// takes a few seconds), so it only catches a decoder that hangs; on time-out the file is
    /// reported bad and the decoding thread is abandoned (a worker process is the stronger guard).
    /// </summary>
    public TimeSpan DecodeTimeout { get; init; } = TimeSpan.FromSeconds(120);

    /// <summary>Percentile of the histogram that maps to 0 when converting 16-bit images. Default 0.1 (common practice).</summary>
    public double StretchLowPercent { get; init; } = 0.1;

    /// <summary>Percentile of the histogram that maps to 255 when converting 16-bit images. Default 99.9 (common practice).</summary>
    public double StretchHighPercent { get; init; } = 99.9;

    /// <summary>The limits a run's settings (<c>Seamwright:Limits</c>) give the loader; the rest at their defaults.</summary>
    public static LoadLimits From(Settings.LimitSettings limits)
    {
        ArgumentNullException.ThrowIfNull(limits);
        return new LoadLimits
        {
            MaxFileBytes = (long)(limits.MaxFileMegabytes * 1024 * 1024),
            MaxPixels = (long)(limits.MaxMegapixels * 1e6),
        };
    }

    /// <summary>Throws with the name of the first setting out of range.</summary>
    public void Validate()
    {
        if (MaxFileBytes < 1)
        {
            throw new ArgumentOutOfRangeException(nameof(MaxFileBytes), MaxFileBytes, "MaxFileBytes must be at least 1.");
        }
        if (MaxPixels < 1)
        {
            throw new ArgumentOutOfRangeException(nameof(MaxPixels), MaxPixels, "MaxPixels must be at least 1.");
        }
        if (AllocationLimitMegabytes is < 16 or > 65536)
        {
            throw new ArgumentOutOfRangeException(nameof(AllocationLimitMegabytes), AllocationLimitMegabytes, "AllocationLimitMegabytes must lie in 16..65536.");
        }
        if (Formats is null || Formats.Count == 0)
        {
            throw new ArgumentException("Formats must list at least one format.", nameof(Formats));
        }
        if (DecodeTimeout <= TimeSpan.Zero)
        {
            throw new ArgumentOutOfRangeException(nameof(DecodeTimeout), DecodeTimeout, "DecodeTimeout must be positive.");
        }
        if (!(StretchLowPercent >= 0 && StretchLowPercent < StretchHighPercent && StretchHighPercent <= 100))
        {
            throw new ArgumentOutOfRangeException(nameof(StretchLowPercent), "Need 0 <= StretchLowPercent < StretchHighPercent <= 100.");
        }
    }
}
