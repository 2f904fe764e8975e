using System.Globalization;
using Seamwright.Pipeline.Settings;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Metadata.Profiles.Exif;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Pipeline.Analysis;

/// <summary>A decoded gray image with its capture time.</summary>
public sealed record GrayPixels(int Width, int Height, byte[] Pixels, DateTimeOffset? CaptureTime);

/// <summary>
/// Decodes an image to 8-bit gray with the limits of docs/RELIABILITY.md checked first: file size, a
/// header-only identify, a pixel budget, and a reservation in the shared memory budget. Any
/// decoder exception becomes an <see cref="ImageRejectedException"/> with the reason.
/// </summary>
public static class BasicImageReader
{
    public static GrayPixels Read(string path, LimitSettings limits, MemoryBudget budget, CancellationToken cancel)
    {
        ArgumentNullException.ThrowIfNull(limits);
        ArgumentNullException.ThrowIfNull(budget);
        var info = new FileInfo(path);
        if (!info.Exists)
        {
            throw new ImageRejectedException("the file vanished before it could be read");
        }
        if (info.Length == 0)
        {
            throw new ImageRejectedException("the file is empty");
        }
        if (info.Length > limits.MaxFileMegabytes * 1024 * 1024)
        {
            throw new ImageRejectedException($"the file is {info.Length / 1048576.0:0.#} MB, above the limit of {limits.MaxFileMegabytes} MB (Seamwright:Limits:MaxFileMegabytes)");
        }
        IImageInfo? header;
        try
        {
            header = Image.Identify(path);
        }
        catch (Exception e) when (e is not OperationCanceledException)
        {
            throw new ImageRejectedException("the header cannot be read: " + e.Message, e);
        }
        if (header is null)
        {
            throw new ImageRejectedException("not an image in a supported format (the content does not match any known format)");
        }
        double mp = (double)header.Width * header.Height / 1e6;
        if (header.Width < 1 || header.Height < 1 || mp > limits.MaxMegapixels)
        {
            throw new ImageRejectedException($"the image claims {header.Width} x {header.Height} pixels ({mp:0.#} MP), above the limit of {limits.MaxMegapixels} MP (Seamwright:Limits:MaxMegapixels)");
        }
        // Decoding a colour image holds about 4 bytes per pixel before the gray conversion.
        using var reservation = budget.Reserve((long)header.Width * header.Height * 4, cancel);
        cancel.ThrowIfCancellationRequested();
        try
        {
            using var image = Image.Load<L8>(path);
            var capture = CaptureTime(image.Metadata.ExifProfile);
            image.Mutate(x => x.AutoOrient());
            var pixels = new byte[image.Width * image.Height];
            image.CopyPixelDataTo(pixels);
            return new GrayPixels(image.Width, image.Height, pixels, capture);
        }
        catch (Exception e) when (e is not OperationCanceledException and not ImageRejectedException)
        {
            throw new ImageRejectedException("the image cannot be decoded: " + e.Message, e);
        }
    }

    private static DateTimeOffset? CaptureTime(ExifProfile? exif)
    {
        var value = exif?.GetValue(ExifTag.DateTimeOriginal)?.Value;
        return value is not null && DateTime.TryParseExact(value.Trim('\0', ' '), "yyyy:MM:dd HH:mm:ss", CultureInfo.InvariantCulture,
            DateTimeStyles.AssumeUniversal | DateTimeStyles.AdjustToUniversal, out var t)
            ? new DateTimeOffset(t, TimeSpan.Zero)
            : null;
    }
}
