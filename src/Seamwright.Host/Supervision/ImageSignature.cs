namespace Seamwright.Host.Supervision;

/// <summary>
/// Format check by magic bytes before any decoder sees the file, so a text file named .png or a
/// format we do not accept never reaches a decoder. Signatures from the format specifications
/// (PNG ISO/IEC 15948, JPEG ITU T.81 SOI marker, TIFF 6.0 and BigTIFF byte orders, BMP "BM",
/// GIF87a/89a, WebP RIFF....WEBP).
/// </summary>
internal static class ImageSignature
{
    public static string? Sniff(string path)
    {
        Span<byte> head = stackalloc byte[12];
        int read;
        using (var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete))
        {
            read = stream.ReadAtLeast(head, head.Length, throwOnEndOfStream: false);
        }
        return Sniff(head[..read]);
    }

    public static string? Sniff(ReadOnlySpan<byte> h)
    {
        if (h.StartsWith((ReadOnlySpan<byte>)[0x89, (byte)'P', (byte)'N', (byte)'G', 0x0D, 0x0A, 0x1A, 0x0A]))
        {
            return "PNG";
        }
        if (h.StartsWith((ReadOnlySpan<byte>)[0xFF, 0xD8, 0xFF]))
        {
            return "JPEG";
        }
        if (h.StartsWith("II*\0"u8) || h.StartsWith("MM\0*"u8) || h.StartsWith("II+\0"u8) || h.StartsWith("MM\0+"u8))
        {
            return "TIFF";
        }
        if (h.StartsWith("BM"u8))
        {
            return "BMP";
        }
        if (h.StartsWith("GIF87a"u8) || h.StartsWith("GIF89a"u8))
        {
            return "GIF";
        }
        if (h.Length >= 12 && h.StartsWith("RIFF"u8) && h[8..12].SequenceEqual("WEBP"u8))
        {
            return "WEBP";
        }
        return null;
    }
}
