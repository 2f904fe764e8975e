using Seamwright.Tests.Shared;
using System.Buffers.Binary;
using System.Security.Cryptography;
using Seamwright.Core.Imaging;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Formats.Png;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Tests.Loading;

/// <summary>Builds good and hostile image files for the loader tests.</summary>
internal static class TestFiles
{
    public static GrayImage Pattern(int width, int height, int seed)
    {
        var image = new GrayImage(width, height);
        uint s = (uint)seed * 2654435761u + 1;
        for (int y = 0; y < height; y++)
        {
            for (int x = 0; x < width; x++)
            {
                s = s * 1664525u + 1013904223u;
                // Smooth gradient plus noise, so JPEG keeps it well and every position differs.
                image[x, y] = (byte)Math.Clamp(40 + x * 150 / width + y * 50 / height + (int)(s >> 29), 0, 255);
            }
        }
        return image;
    }

    public static Image<L8> ToImage(GrayImage gray) => Image.LoadPixelData<L8>(gray.Pixels, gray.Width, gray.Height);

    public static byte[] Jpeg(GrayImage gray)
    {
        using var image = ToImage(gray);
        using var ms = new MemoryStream();
        image.SaveAsJpeg(ms);
        return ms.ToArray();
    }

    /// <summary>A PNG whose header claims the given size, with a token IDAT and a proper IEND.</summary>
    public static byte[] PngClaimingSize(uint width, uint height)
    {
        var ihdr = new byte[13];
        BinaryPrimitives.WriteUInt32BigEndian(ihdr, width);
        BinaryPrimitives.WriteUInt32BigEndian(ihdr.AsSpan(4), height);
        ihdr[8] = 8; // bit depth
        ihdr[9] = 0; // gray
        byte[] idat = [0x78, 0x9C, 0x63, 0x00, 0x00, 0x00, 0x01, 0x00, 0x01]; // zlib stream of one zero byte
        return [0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A, .. PngChunks.Chunk("IHDR", ihdr), .. PngChunks.Chunk("IDAT", idat), .. PngChunks.Chunk("IEND", [])];
    }

    /// <summary>35 bytes: a BMP file header claiming a 0x7FFFFFFF pixel offset and a 40-byte info header (after ImageSharp#3074).</summary>
    public static byte[] TinyBmpWithHugeOffset()
    {
        var b = new byte[35];
        b[0] = 0x42;
        b[1] = 0x4D;
        BinaryPrimitives.WriteUInt32LittleEndian(b.AsSpan(2), 35);
        BinaryPrimitives.WriteUInt32LittleEndian(b.AsSpan(10), 0x7FFFFFFF);
        BinaryPrimitives.WriteUInt32LittleEndian(b.AsSpan(14), 40);
        BinaryPrimitives.WriteInt32LittleEndian(b.AsSpan(18), 1);
        BinaryPrimitives.WriteInt32LittleEndian(b.AsSpan(22), 1);
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(26), 1);
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(28), 24);
        return b;
    }

    /// <summary>A BigTIFF whose first directory claims 2^62 entries (after GHSA-wmxv-xphr-5c9g).</summary>
    public static byte[] BigTiffWithHugeEntryCount()
    {
        var b = new byte[64];
        b[0] = 0x49;
        b[1] = 0x49;
        b[2] = 0x2B;
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(4), 8);
        BinaryPrimitives.WriteUInt64LittleEndian(b.AsSpan(8), 16);
        BinaryPrimitives.WriteUInt64LittleEndian(b.AsSpan(16), 1UL << 62);
        return b;
    }

    /// <summary>A classic TIFF whose only directory names itself as the next one.</summary>
    public static byte[] TiffWithDirectoryLoop()
    {
        var b = new byte[8 + 2 + 12 + 4];
        b[0] = 0x49;
        b[1] = 0x49;
        b[2] = 0x2A;
        BinaryPrimitives.WriteUInt32LittleEndian(b.AsSpan(4), 8);
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(8), 1);
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(10), 256); // ImageWidth
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(12), 3);
        BinaryPrimitives.WriteUInt32LittleEndian(b.AsSpan(14), 1);
        BinaryPrimitives.WriteUInt16LittleEndian(b.AsSpan(18), 16);
        BinaryPrimitives.WriteUInt32LittleEndian(b.AsSpan(22), 8);
        return b;
    }

    public static string Hash(string path) => Convert.ToHexString(SHA256.HashData(System.IO.File.ReadAllBytes(path)));

    public static PngEncoder GrayPng => new() { ColorType = PngColorType.Grayscale, BitDepth = PngBitDepth.Bit8 };
}
