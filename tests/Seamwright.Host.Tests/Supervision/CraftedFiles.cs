using System.Buffers.Binary;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Formats.Bmp;
using SixLabors.ImageSharp.Formats.Jpeg;
using SixLabors.ImageSharp.Formats.Png;
using SixLabors.ImageSharp.Formats.Tiff;
using SixLabors.ImageSharp.PixelFormats;
using Seamwright.Tests.Shared;

namespace Seamwright.Host.Tests.Supervision;

/// <summary>
/// Hostile and valid inputs made by the tests themselves. The hostile ones follow the failure
/// modes listed in docs/RELIABILITY.md (GHSA-wmxv-xphr-5c9g BigTIFF entry count, ImageSharp#3074
/// BMP pixel offset), built from the format specifications (TIFF 6.0 / BigTIFF, BMP
/// BITMAPFILEHEADER, PNG ISO/IEC 15948 IHDR, JPEG ITU T.81 markers).
/// </summary>
internal static class CraftedFiles
{
    /// <summary>BigTIFF header ("II", 43, offset size 8) whose first IFD claims 2^40 entries.</summary>
    public static byte[] BigTiffHugeEntryCount()
    {
        var b = new byte[64];
        b[0] = (byte)'I';
        b[1] = (byte)'I';
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(2), 43);
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(4), 8);
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(6), 0);
        BinaryPrimitives.WriteUInt64LittleEndian(b.AsSpan(8), 16); // first IFD offset
        BinaryPrimitives.WriteUInt64LittleEndian(b.AsSpan(16), 1UL << 40); // entry count
        return b;
    }

    /// <summary>A 35-byte BMP (14-byte file header + 12-byte core header + 9 bytes) with pixel offset 0x7FFFFFFF.</summary>
    public static byte[] BmpHugePixelOffset()
    {
        var b = new byte[35];
        b[0] = (byte)'B';
        b[1] = (byte)'M';
        BinaryPrimitives.WriteInt32LittleEndian(b.AsSpan(2), 35);
        BinaryPrimitives.WriteInt32LittleEndian(b.AsSpan(10), 0x7FFFFFFF);
        BinaryPrimitives.WriteInt32LittleEndian(b.AsSpan(14), 12); // BITMAPCOREHEADER
        BinaryPrimitives.WriteInt16LittleEndian(b.AsSpan(18), 1);
        BinaryPrimitives.WriteInt16LittleEndian(b.AsSpan(20), 1);
        BinaryPrimitives.WriteInt16LittleEndian(b.AsSpan(22), 1);
        BinaryPrimitives.WriteInt16LittleEndian(b.AsSpan(24), 24);
        return b;
    }

    /// <summary>A PNG whose IHDR (with a correct CRC) claims 60000 x 60000 RGBA, followed by a tiny IDAT and IEND.</summary>
    public static byte[] PngClaiming60000Squared()
    {
        using var ms = new MemoryStream();
        ms.Write([0x89, (byte)'P', (byte)'N', (byte)'G', 0x0D, 0x0A, 0x1A, 0x0A]);
        var ihdr = new byte[13];
        BinaryPrimitives.WriteInt32BigEndian(ihdr, 60000);
        BinaryPrimitives.WriteInt32BigEndian(ihdr.AsSpan(4), 60000);
        ihdr[8] = 8; // bit depth
        ihdr[9] = 6; // RGBA
        ms.Write(PngChunks.Chunk("IHDR", ihdr));
        ms.Write(PngChunks.Chunk("IDAT", [0x78, 0x9C, 0x03, 0x00, 0x00, 0x00, 0x00, 0x01]));
        ms.Write(PngChunks.Chunk("IEND", []));
        return ms.ToArray();
    }

    public static byte[] TruncatedJpeg(byte[] validJpeg) => validJpeg[..(validJpeg.Length / 2)];

    /// <summary>A JPEG whose entropy-coded data after the first start-of-scan is overwritten with noise.</summary>
    public static byte[] CorruptJpeg(byte[] validJpeg)
    {
        var b = (byte[])validJpeg.Clone();
        int sos = b.AsSpan().IndexOf((ReadOnlySpan<byte>)[0xFF, 0xDA]);
        var noise = new Random(7);
        for (int i = sos + 20; i < b.Length - 2; i++)
        {
            b[i] = (byte)noise.Next(256);
        }
        return b;
    }

    public static byte[] TextNamedPng() => "This is not an image; it only has a .png name.\n"u8.ToArray();

    /// <summary>Small valid images in the four lossless/lossy formats the loader accepts and ImageSharp can write, from a deterministic pattern.</summary>
    public static IReadOnlyList<(string Extension, byte[] Bytes)> ValidSmallImages(int size = 24)
    {
        using var image = new Image<Rgb24>(size, size);
        for (int y = 0; y < size; y++)
        {
            for (int x = 0; x < size; x++)
            {
                image[x, y] = new Rgb24((byte)(x * 10), (byte)(y * 10), (byte)((x ^ y) * 8));
            }
        }
        return
        [
            (".png", Encode(image, new PngEncoder())),
            (".jpg", Encode(image, new JpegEncoder { Quality = 90 })),
            (".bmp", Encode(image, new BmpEncoder())),
            (".tif", Encode(image, new TiffEncoder())),
        ];
    }

    /// <summary>
    /// A seeded mutation of a valid file: flipped bytes, a truncation, a run of 0xFF, an
    /// inserted block, or a 32-bit field set to an extreme value (sizes, offsets, counts).
    /// </summary>
    public static byte[] Mutate(byte[] valid, Random random)
    {
        var b = new List<byte>(valid);
        int edits = 1 + random.Next(4);
        for (int e = 0; e < edits && b.Count > 8; e++)
        {
            int at = random.Next(b.Count);
            switch (random.Next(5))
            {
                case 0:
                    b[at] ^= (byte)(1 << random.Next(8));
                    break;
                case 1:
                    b.RemoveRange(Math.Max(8, at), b.Count - Math.Max(8, at));
                    break;
                case 2:
                    for (int i = at; i < Math.Min(b.Count, at + 1 + random.Next(16)); i++)
                    {
                        b[i] = 0xFF;
                    }
                    break;
                case 3:
                    var block = new byte[1 + random.Next(32)];
                    random.NextBytes(block);
                    b.InsertRange(at, block);
                    break;
                default:
                    uint[] extremes = [0x7FFFFFFF, 0xFFFFFFFF, 0x80000000, 0x0000FFFF, 0x00010000, 0];
                    uint v = extremes[random.Next(extremes.Length)];
                    for (int i = 0; i < 4 && at + i < b.Count; i++)
                    {
                        b[at + i] = (byte)(v >> (8 * i));
                    }
                    break;
            }
        }
        return [.. b];
    }

    private static byte[] Encode(Image image, SixLabors.ImageSharp.Formats.IImageEncoder encoder)
    {
        using var ms = new MemoryStream();
        image.Save(ms, encoder);
        return ms.ToArray();
    }
}
