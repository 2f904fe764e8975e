namespace Seamwright.Pipeline.Loading;

/// <summary>Image file formats the loader can accept (each only when listed in <see cref="LoadLimits.Formats"/>).</summary>
public enum ImageFileFormat
{
    Jpeg,
    Png,
    Tiff,
    Bmp,
    Webp,
}

/// <summary>Recognises a format from the first bytes of a file (its signature), never from the file name.</summary>
internal static class FormatSignature
{
    /// <summary>Bytes needed to recognise every supported format.</summary>
    public const int Length = 16;

    public static ImageFileFormat? Detect(ReadOnlySpan<byte> head)
    {
        if (head.Length >= 3 && head[0] == 0xFF && head[1] == 0xD8 && head[2] == 0xFF)
        {
            return ImageFileFormat.Jpeg;
        }
        if (head.Length >= 8 && head[..8].SequenceEqual((ReadOnlySpan<byte>)[0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A]))
        {
            return ImageFileFormat.Png;
        }
        if (head.Length >= 4 && ((head[0] == 0x49 && head[1] == 0x49 && (head[2] == 0x2A || head[2] == 0x2B) && head[3] == 0) ||
                                 (head[0] == 0x4D && head[1] == 0x4D && head[2] == 0 && (head[3] == 0x2A || head[3] == 0x2B))))
        {
            return ImageFileFormat.Tiff;
        }
        if (head.Length >= 2 && head[0] == 0x42 && head[1] == 0x4D)
        {
            return ImageFileFormat.Bmp;
        }
        if (head.Length >= 12 && head[..4].SequenceEqual("RIFF"u8) && head[8..12].SequenceEqual("WEBP"u8))
        {
            return ImageFileFormat.Webp;
        }
        return null;
    }

    /// <summary>The first bytes as hex, for error messages.</summary>
    public static string Describe(ReadOnlySpan<byte> head) =>
        head.IsEmpty ? "(empty)" : Convert.ToHexString(head[..Math.Min(8, head.Length)]);
}
