using Microsoft.Win32.SafeHandles;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Metadata.Profiles.Exif;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Pipeline.Loading;

/// <summary>The colour load for previews and thumbnails: the same checks, limits and time-out as the gray load.</summary>
public sealed partial class ImageLoader
{
    /// <summary>
    /// Loads the file in colour (8 bits per channel), upright as displayed and scaled down so its
    /// long side is at most <paramref name="maxLongSide"/> (never up). Every check of
    /// <see cref="Load"/> runs first; a failure is an <see cref="ImageLoadException"/> naming the file.
    /// </summary>
    public Image<Rgb24> LoadColour(string path, int maxLongSide)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(maxLongSide, 1);
        using var handle = Open(path);
        var header = Probe(path, handle, out _);
        // The abandoned decode of a time-out disposes its own image when it ends.
        return WithTimeout(path, token => DecodeColour(path, handle, header, maxLongSide, token), image => image.Dispose());
    }

    private Image<Rgb24> DecodeColour(string path, SafeFileHandle handle, ImageHeader header, int maxLongSide, CancellationToken token)
    {
        Image<Rgb24>? image = null;
        try
        {
            using var stream = new HandleStream(handle, RandomAccess.GetLength(handle));
            image = Image.LoadAsync<Rgb24>(_configuration, stream, CreateDecoder(header.Format), token).GetAwaiter().GetResult();
            if (header.Orientation != 1)
            {
                // The decode skips metadata; the orientation read from the header is applied the way
                // ImageSharp applies an EXIF orientation.
                image.Metadata.ExifProfile ??= new ExifProfile();
                image.Metadata.ExifProfile.SetValue(ExifTag.Orientation, (ushort)header.Orientation);
                image.Mutate(x => x.AutoOrient());
            }
            double s = Math.Min(1.0, (double)maxLongSide / Math.Max(image.Width, image.Height));
            if (s < 1)
            {
                int w = Math.Max(1, (int)Math.Round(image.Width * s)), h = Math.Max(1, (int)Math.Round(image.Height * s));
                image.Mutate(x => x.Resize(w, h));
            }
            var done = image;
            image = null;
            return done;
        }
        catch (Exception e) when (e is not ImageLoadException)
        {
            throw Classify(path, e, "decoding");
        }
        finally
        {
            image?.Dispose();
        }
    }
}
