using System.Buffers.Binary;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Host.Supervision;

/// <summary>
/// How a worker hands a preview image back: the 4 bytes "SWPX", width and height as 32-bit
/// little-endian integers, then the RGB pixels row by row (3 bytes each). Lossless, so the
/// preview is the same whether the image was opened here or in a worker.
/// </summary>
internal static class PreviewPixels
{
    private static ReadOnlySpan<byte> Magic => "SWPX"u8;

    /// <summary>Largest side accepted when reading (the preview setting allows 8192).</summary>
    private const int MaxSide = 16384;

    public static void Write(Stream stream, Image<Rgb24> image)
    {
        Span<byte> header = stackalloc byte[12];
        Magic.CopyTo(header);
        BinaryPrimitives.WriteInt32LittleEndian(header[4..], image.Width);
        BinaryPrimitives.WriteInt32LittleEndian(header[8..], image.Height);
        stream.Write(header);
        var pixels = new byte[3L * image.Width * image.Height];
        image.ProcessPixelRows(rows =>
        {
            for (int y = 0; y < rows.Height; y++)
            {
                System.Runtime.InteropServices.MemoryMarshal.AsBytes(rows.GetRowSpan(y)).CopyTo(pixels.AsSpan(y * rows.Width * 3));
            }
        });
        stream.Write(pixels);
    }

    public static Image<Rgb24> Read(ReadOnlySpan<byte> data)
    {
        if (data.Length < 12 || !data[..4].SequenceEqual(Magic))
        {
            throw new InvalidDataException("not a preview pixel file");
        }
        int width = BinaryPrimitives.ReadInt32LittleEndian(data[4..]), height = BinaryPrimitives.ReadInt32LittleEndian(data[8..]);
        if (width is < 1 or > MaxSide || height is < 1 or > MaxSide || data.Length != 12 + 3L * width * height)
        {
            throw new InvalidDataException($"preview pixel file of {data.Length} bytes does not hold {width} x {height} pixels");
        }
        return Image.LoadPixelData<Rgb24>(data[12..], width, height);
    }
}
