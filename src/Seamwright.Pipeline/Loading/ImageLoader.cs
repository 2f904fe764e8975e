using System.Runtime.InteropServices;
using Microsoft.Win32.SafeHandles;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Formats;
using SixLabors.ImageSharp.Formats.Bmp;
using SixLabors.ImageSharp.Formats.Jpeg;
using SixLabors.ImageSharp.Formats.Png;
using SixLabors.ImageSharp.Formats.Tiff;
using SixLabors.ImageSharp.Formats.Webp;
using SixLabors.ImageSharp.Memory;
using SixLabors.ImageSharp.Metadata;
using SixLabors.ImageSharp.Metadata.Profiles.Exif;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Loading;

/// <summary>
/// Loads image files as full-resolution 8-bit gray, upright as displayed, with limits checked
/// in order of cost: file size; content signature against the allowed formats; a structural
/// check (<see cref="StructureCheck"/>); the header read by <c>Image.Identify</c> and the pixel
/// budget; only then the decode, with ImageSharp's own memory allocator capped by
/// <see cref="LoadLimits.AllocationLimitMegabytes"/> and a wall-clock limit. Only the first
/// frame is decoded and metadata is skipped in the decode (the orientation comes from the
/// header read). Colour becomes gray by ImageSharp's luminance conversion (ITU-R BT.709
/// weights 0.2126 R + 0.7152 G + 0.0722 B on the stored values); more than 8 bits per sample
/// become 8 by a percentile stretch. Files are opened read-only and never changed. Every
/// failure is an <see cref="ImageLoadException"/> naming the file. Thread-safe.
/// </summary>
public sealed partial class ImageLoader
{
    private readonly Configuration _configuration;

    public ImageLoader(LoadLimits? limits = null)
    {
        Limits = limits ?? new LoadLimits();
        Limits.Validate();
        _configuration = CreateConfiguration(Limits);
    }

    public LoadLimits Limits { get; }

    /// <summary>Reads and checks the header only (no pixel decode); throws <see cref="ImageLoadException"/> when a limit is broken.</summary>
    public ImageHeader Probe(string path)
    {
        using var handle = Open(path);
        return Probe(path, handle, out _);
    }

    /// <summary>Loads the file as gray pixels as displayed.</summary>
    public LoadedImage Load(string path)
    {
        using var handle = Open(path);
        var header = Probe(path, handle, out _);
        var stored = DecodeWithTimeout(path, handle, header, out StretchRange? stretch);
        var display = ExifOrientation.ToDisplay(stored, header.Orientation);
        return new LoadedImage(header, display, stretch);
    }

    private ImageHeader Probe(string path, SafeFileHandle handle, out long length)
    {
        try
        {
            length = RandomAccess.GetLength(handle);
        }
        catch (IOException e)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Unreadable, $"cannot read the file size ({e.Message})", e);
        }
        if (length == 0)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Empty, "the file is empty (0 bytes)");
        }
        if (length > Limits.MaxFileBytes)
        {
            throw new ImageLoadException(path, ImageLoadFailure.FileTooLarge, $"the file has {length} bytes, above the limit of {Limits.MaxFileBytes}");
        }
        Span<byte> head = stackalloc byte[FormatSignature.Length];
        head = head[..(int)Math.Min(head.Length, length)];
        StructureCheck.ReadExactly(path, handle, head, 0);
        var format = FormatSignature.Detect(head)
            ?? throw new ImageLoadException(path, ImageLoadFailure.UnknownFormat,
                $"the content is not a recognised image format (starts with {FormatSignature.Describe(head)})");
        if (!Limits.Formats.Contains(format))
        {
            throw new ImageLoadException(path, ImageLoadFailure.FormatNotAllowed, $"{format} files are not enabled");
        }
        var tiff = StructureCheck.Run(path, handle, length, format);
        IImageInfo? info;
        try
        {
            using var stream = new HandleStream(handle, length);
            info = Image.Identify(_configuration, stream, out _);
        }
        catch (Exception e) when (e is not ImageLoadException)
        {
            throw Classify(path, e, "reading the header");
        }
        if (info is null || info.Width <= 0 || info.Height <= 0)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Corrupt, $"the {format} header could not be read");
        }
        long pixels = (long)info.Width * info.Height;
        if (pixels > Limits.MaxPixels)
        {
            throw new ImageLoadException(path, ImageLoadFailure.TooManyPixels,
                $"the header declares {info.Width} x {info.Height} = {pixels} pixels, above the limit of {Limits.MaxPixels}");
        }
        int orientation = tiff?.Orientation ?? ReadOrientation(info.Metadata);
        int bits = tiff?.BitsPerSample ?? BitsPerSample(format, info);
        return new ImageHeader(path, format, new ImageSize(info.Width, info.Height), ExifOrientation.Normalize(orientation), bits);
    }

    private GrayImage DecodeWithTimeout(string path, SafeFileHandle handle, ImageHeader header, out StretchRange? stretch)
    {
        (var image, stretch) = WithTimeout(path, token => Decode(path, handle, header, token));
        return image;
    }

    /// <summary>
    /// Runs one decode under <see cref="LoadLimits.DecodeTimeout"/>: its failures classified, a time-out
    /// cancels it and throws (the decode's result, should it still come, is given to <paramref name="abandon"/>).
    /// </summary>
    private T WithTimeout<T>(string path, Func<CancellationToken, T> decode, Action<T>? abandon = null)
    {
        using var cancel = new CancellationTokenSource();
        var task = Task.Run(() => decode(cancel.Token), CancellationToken.None);
        bool finished;
        try
        {
            finished = task.Wait(Limits.DecodeTimeout);
        }
        catch (AggregateException e) when (e.InnerException is not null)
        {
            throw e.InnerException is ImageLoadException le ? le : Classify(path, e.InnerException, "decoding");
        }
        if (!finished)
        {
            cancel.Cancel();
            if (abandon is not null)
            {
                _ = task.ContinueWith(t => abandon(t.Result), CancellationToken.None, TaskContinuationOptions.OnlyOnRanToCompletion, TaskScheduler.Default);
            }
            throw new ImageLoadException(path, ImageLoadFailure.Timeout, $"decoding took longer than {Limits.DecodeTimeout.TotalSeconds:0.#} s");
        }
        return task.Result;
    }

    private (GrayImage Image, StretchRange? Stretch) Decode(string path, SafeFileHandle handle, ImageHeader header, CancellationToken token)
    {
        try
        {
            using var stream = new HandleStream(handle, RandomAccess.GetLength(handle));
            var decoder = CreateDecoder(header.Format);
            if (header.IsHighDepth)
            {
                using var image16 = Image.LoadAsync<L16>(_configuration, stream, decoder, token).GetAwaiter().GetResult();
                var samples = CopyPixels<L16, ushort>(image16);
                var range = PercentileStretch.FindRange(samples, Limits.StretchLowPercent, Limits.StretchHighPercent);
                var gray = new GrayImage(image16.Width, image16.Height);
                PercentileStretch.Apply(samples, range, gray.Pixels);
                return (gray, range);
            }
            using var image8 = Image.LoadAsync<L8>(_configuration, stream, decoder, token).GetAwaiter().GetResult();
            return (new GrayImage(image8.Width, image8.Height, CopyPixels<L8, byte>(image8)), null);
        }
        catch (Exception e) when (e is not ImageLoadException)
        {
            throw Classify(path, e, "decoding");
        }
    }

    private static TValue[] CopyPixels<TPixel, TValue>(Image<TPixel> image)
        where TPixel : unmanaged, IPixel<TPixel>
        where TValue : unmanaged
    {
        var values = new TValue[checked(image.Width * image.Height)];
        int width = image.Width;
        image.ProcessPixelRows(accessor =>
        {
            for (int y = 0; y < accessor.Height; y++)
            {
                MemoryMarshal.Cast<TPixel, TValue>(accessor.GetRowSpan(y)).CopyTo(values.AsSpan(y * width, width));
            }
        });
        return values;
    }

    private static ImageLoadException Classify(string path, Exception e, string stage) => Innermost(e) switch
    {
        InvalidMemoryOperationException m => new ImageLoadException(path, ImageLoadFailure.MemoryLimit, $"{stage} needed more memory than allowed ({m.Message})", e),
        OutOfMemoryException => new ImageLoadException(path, ImageLoadFailure.MemoryLimit, $"{stage} ran out of memory", e),
        OperationCanceledException => new ImageLoadException(path, ImageLoadFailure.Timeout, $"{stage} was cancelled after the time limit", e),
        UnknownImageFormatException => new ImageLoadException(path, ImageLoadFailure.UnknownFormat, $"{stage}: the decoder does not recognise the content", e),
        EndOfStreamException => new ImageLoadException(path, ImageLoadFailure.Truncated, $"{stage}: unexpected end of file", e),
        IOException => new ImageLoadException(path, ImageLoadFailure.Unreadable, $"{stage}: {e.Message}", e),
        _ => new ImageLoadException(path, ImageLoadFailure.DecodeFailed, $"{stage} failed: {e.Message}", e),
    };

    /// <summary>The decoder wraps allocation failures; the root cause decides the kind.</summary>
    private static Exception Innermost(Exception e)
    {
        for (var x = e; x is not null; x = x.InnerException)
        {
            if (x is InvalidMemoryOperationException or OutOfMemoryException or OperationCanceledException)
            {
                return x;
            }
        }
        return e;
    }

    private static SafeFileHandle Open(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        try
        {
            return File.OpenHandle(path, FileMode.Open, FileAccess.Read, FileShare.Read | FileShare.Delete);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or NotSupportedException or ArgumentException)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Unreadable, $"cannot open the file ({e.Message})", e);
        }
    }

    private static int ReadOrientation(ImageMetadata metadata)
    {
        var value = metadata.ExifProfile?.GetValue(ExifTag.Orientation);
        return value is null ? 1 : value.Value;
    }

    private static int BitsPerSample(ImageFileFormat format, IImageInfo info) => format switch
    {
        ImageFileFormat.Png when info.Metadata.GetPngMetadata().BitDepth == PngBitDepth.Bit16 => 16,
        _ => info.PixelType.BitsPerPixel >= 48 ? 16 : 8,
    };

    private static IImageDecoder CreateDecoder(ImageFileFormat format) => format switch
    {
        ImageFileFormat.Jpeg => new JpegDecoder { IgnoreMetadata = true },
        ImageFileFormat.Png => new PngDecoder { IgnoreMetadata = true },
        ImageFileFormat.Tiff => new TiffDecoder { IgnoreMetadata = true, DecodingMode = FrameDecodingMode.First },
        ImageFileFormat.Bmp => new BmpDecoder(),
        ImageFileFormat.Webp => new WebpDecoder { IgnoreMetadata = true },
        _ => throw new ArgumentOutOfRangeException(nameof(format), format, "Unknown format."),
    };

    private static Configuration CreateConfiguration(LoadLimits limits)
    {
        var modules = new List<IConfigurationModule>();
        foreach (var format in limits.Formats.Distinct())
        {
            modules.Add(format switch
            {
                ImageFileFormat.Jpeg => new JpegConfigurationModule(),
                ImageFileFormat.Png => new PngConfigurationModule(),
                ImageFileFormat.Tiff => new TiffConfigurationModule(),
                ImageFileFormat.Bmp => new BmpConfigurationModule(),
                ImageFileFormat.Webp => new WebpConfigurationModule(),
                _ => throw new ArgumentOutOfRangeException(nameof(limits), format, "Unknown format."),
            });
        }
        return new Configuration([.. modules])
        {
            // AllocationLimitMegabytes exists in ImageSharp 2.1.x (checked in the 2.1.13 API):
            // it caps the largest (possibly discontiguous) buffer one allocation may ask for.
            MemoryAllocator = MemoryAllocator.Create(new MemoryAllocatorOptions
            {
                AllocationLimitMegabytes = limits.AllocationLimitMegabytes,
                MaximumPoolSizeMegabytes = 64,
            }),
            // Parallelism belongs across images (the service), not inside one decode.
            MaxDegreeOfParallelism = 1,
        };
    }
}
