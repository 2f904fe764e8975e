namespace Seamwright.Pipeline.Loading;

/// <summary>Why an image file could not be loaded.</summary>
public enum ImageLoadFailure
{
    /// <summary>The file does not exist or cannot be opened for reading.</summary>
    Unreadable,

    /// <summary>The file has no bytes.</summary>
    Empty,

    /// <summary>The file is larger than <see cref="LoadLimits.MaxFileBytes"/>.</summary>
    FileTooLarge,

    /// <summary>The content is not one of the recognised image formats (whatever the file name says).</summary>
    UnknownFormat,

    /// <summary>A recognised format that is not enabled in <see cref="LoadLimits.Formats"/>.</summary>
    FormatNotAllowed,

    /// <summary>The file is cut short (no end marker, or a declared size beyond the end).</summary>
    Truncated,

    /// <summary>The structure contradicts itself or the file (offsets past the end, impossible counts, loops).</summary>
    Corrupt,

    /// <summary>The header declares more pixels than <see cref="LoadLimits.MaxPixels"/>.</summary>
    TooManyPixels,

    /// <summary>Decoding needed a buffer above <see cref="LoadLimits.AllocationLimitMegabytes"/>, or memory ran out.</summary>
    MemoryLimit,

    /// <summary>Decoding took longer than <see cref="LoadLimits.DecodeTimeout"/>.</summary>
    Timeout,

    /// <summary>The decoder rejected the content.</summary>
    DecodeFailed,
}

/// <summary>A file that could not be loaded: the path, the kind of failure and a reason in words.</summary>
public sealed class ImageLoadException : Exception
{
    public ImageLoadException(string path, ImageLoadFailure failure, string reason, Exception? inner = null)
        : base($"{path}: {reason}", inner)
    {
        FilePath = path;
        Failure = failure;
        Reason = reason;
    }

    public ImageLoadException()
        : this(string.Empty, ImageLoadFailure.DecodeFailed, "unknown failure")
    {
    }

    public ImageLoadException(string message)
        : this(string.Empty, ImageLoadFailure.DecodeFailed, message)
    {
    }

    public ImageLoadException(string message, Exception innerException)
        : this(string.Empty, ImageLoadFailure.DecodeFailed, message, innerException)
    {
    }

    public string FilePath { get; }

    public ImageLoadFailure Failure { get; }

    public string Reason { get; }
}
