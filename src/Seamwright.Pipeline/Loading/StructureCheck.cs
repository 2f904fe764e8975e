using System.Buffers.Binary;
using Microsoft.Win32.SafeHandles;

namespace Seamwright.Pipeline.Loading;

/// <summary>Facts read while checking a TIFF's directory structure.</summary>
internal readonly record struct TiffFacts(int Orientation, int BitsPerSample);

/// <summary>
/// Cheap structural checks made before the decoder sees a file, each reading a few bounded
/// pieces: a JPEG must end with its end-of-image marker and a PNG with IEND (so a file still
/// being written, or cut short, is not decoded into a half-gray picture); a BMP's pixel offset
/// must lie inside the file (a 35-byte BMP claiming an offset of 2 GB asks the decoder for about
/// 2 GB, ImageSharp#3074); a WebP's RIFF size must fit the file; a TIFF's directory chain must
/// stay inside the file, not loop, and hold plausible entry counts (a crafted BigTIFF entry count
/// can hang the decoder, GHSA-wmxv-xphr-5c9g).
/// </summary>
internal static class StructureCheck
{
    /// <summary>How far from the end an end marker may sit (some writers pad or append a little).</summary>
    internal const int TailWindow = 1024;

    private const int MaxTiffDirectories = 4096;
    private const long MaxTiffEntries = 65535;

    public static TiffFacts? Run(string path, SafeFileHandle handle, long length, ImageFileFormat format)
    {
        switch (format)
        {
            case ImageFileFormat.Jpeg:
                RequireTail(path, handle, length, [0xFF, 0xD9], "JPEG has no end-of-image marker (FF D9) near its end: the file is cut short or still being written");
                return null;
            case ImageFileFormat.Png:
                CheckPngHeader(path, handle, length);
                RequireTail(path, handle, length, "IEND"u8, "PNG has no IEND chunk near its end: the file is cut short or still being written");
                return null;
            case ImageFileFormat.Bmp:
                CheckBmp(path, handle, length);
                return null;
            case ImageFileFormat.Webp:
                CheckWebp(path, handle, length);
                return null;
            case ImageFileFormat.Tiff:
                return CheckTiff(path, handle, length);
            default:
                return null;
        }
    }

    private static void RequireTail(string path, SafeFileHandle handle, long length, ReadOnlySpan<byte> marker, string reason)
    {
        int n = (int)Math.Min(TailWindow, length);
        Span<byte> tail = stackalloc byte[TailWindow];
        tail = tail[..n];
        ReadExactly(path, handle, tail, length - n);
        if (tail.LastIndexOf(marker) < 0)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Truncated, reason);
        }
    }

    private static void CheckPngHeader(string path, SafeFileHandle handle, long length)
    {
        if (length < 33)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Truncated, $"PNG of {length} bytes is too short to hold its header");
        }
        Span<byte> head = stackalloc byte[16];
        ReadExactly(path, handle, head, 8);
        if (BinaryPrimitives.ReadUInt32BigEndian(head) != 13 || !head[4..8].SequenceEqual("IHDR"u8))
        {
            throw new ImageLoadException(path, ImageLoadFailure.Corrupt, "PNG does not start with a valid IHDR chunk");
        }
    }

    private static void CheckBmp(string path, SafeFileHandle handle, long length)
    {
        if (length < 26)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Truncated, $"BMP of {length} bytes is too short to hold its headers");
        }
        Span<byte> head = stackalloc byte[18];
        ReadExactly(path, handle, head, 0);
        uint pixelOffset = BinaryPrimitives.ReadUInt32LittleEndian(head[10..]);
        uint infoSize = BinaryPrimitives.ReadUInt32LittleEndian(head[14..]);
        if (infoSize < 12 || 14 + (long)infoSize > length)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Corrupt, $"BMP info header of {infoSize} bytes does not fit the {length}-byte file");
        }
        if (pixelOffset < 14 + infoSize || pixelOffset >= length)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Corrupt, $"BMP pixel data offset {pixelOffset} lies outside the {length}-byte file");
        }
    }

    private static void CheckWebp(string path, SafeFileHandle handle, long length)
    {
        Span<byte> head = stackalloc byte[12];
        ReadExactly(path, handle, head, 0);
        long riffSize = BinaryPrimitives.ReadUInt32LittleEndian(head[4..]);
        if (riffSize + 8 > length)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Truncated, $"WebP declares {riffSize + 8} bytes but the file has {length}");
        }
    }

    private static TiffFacts CheckTiff(string path, SafeFileHandle handle, long length)
    {
        Span<byte> head = stackalloc byte[16];
        if (length < 16)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Truncated, $"TIFF of {length} bytes is too short to hold its header");
        }
        ReadExactly(path, handle, head, 0);
        bool little = head[0] == 0x49;
        bool big = (little ? head[2] : head[3]) == 0x2B;
        var reader = new TiffReader(path, handle, length, little, big);
        long offset;
        if (big)
        {
            if (reader.U16(head[4..]) != 8 || reader.U16(head[6..]) != 0)
            {
                throw new ImageLoadException(path, ImageLoadFailure.Corrupt, "BigTIFF header has an unexpected offset size");
            }
            offset = (long)Math.Min(reader.U64(head[8..]), long.MaxValue);
        }
        else
        {
            offset = reader.U32(head[4..]);
        }
        var visited = new HashSet<long>();
        TiffFacts facts = new(1, 8);
        for (int index = 0; offset != 0; index++)
        {
            if (index >= MaxTiffDirectories)
            {
                throw new ImageLoadException(path, ImageLoadFailure.Corrupt, $"TIFF has more than {MaxTiffDirectories} image directories");
            }
            if (!visited.Add(offset))
            {
                throw new ImageLoadException(path, ImageLoadFailure.Corrupt, $"TIFF image directories loop back to offset {offset}");
            }
            offset = reader.ReadDirectory(offset, index == 0 ? (f => facts = f) : null);
        }
        if (visited.Count == 0)
        {
            throw new ImageLoadException(path, ImageLoadFailure.Corrupt, "TIFF has no image directory");
        }
        return facts;
    }

    internal static void ReadExactly(string path, SafeFileHandle handle, Span<byte> buffer, long offset)
    {
        int done = 0;
        while (done < buffer.Length)
        {
            int n = RandomAccess.Read(handle, buffer[done..], offset + done);
            if (n <= 0)
            {
                throw new ImageLoadException(path, ImageLoadFailure.Truncated, $"unexpected end of file at byte {offset + done}");
            }
            done += n;
        }
    }

    private sealed class TiffReader(string path, SafeFileHandle handle, long length, bool little, bool big)
    {
        private int EntrySize => big ? 20 : 12;

        private int InlineSize => big ? 8 : 4;

        public ushort U16(ReadOnlySpan<byte> b) => little ? BinaryPrimitives.ReadUInt16LittleEndian(b) : BinaryPrimitives.ReadUInt16BigEndian(b);

        public uint U32(ReadOnlySpan<byte> b) => little ? BinaryPrimitives.ReadUInt32LittleEndian(b) : BinaryPrimitives.ReadUInt32BigEndian(b);

        public ulong U64(ReadOnlySpan<byte> b) => little ? BinaryPrimitives.ReadUInt64LittleEndian(b) : BinaryPrimitives.ReadUInt64BigEndian(b);

        /// <summary>Checks one directory and returns the offset of the next (0 at the end).</summary>
        public long ReadDirectory(long offset, Action<TiffFacts>? onFacts)
        {
            int countSize = big ? 8 : 2;
            if (offset < 8 || offset > length - countSize)
            {
                throw Corrupt($"TIFF image directory offset {offset} lies outside the {length}-byte file");
            }
            Span<byte> countBytes = stackalloc byte[8];
            ReadExactly(path, handle, countBytes[..countSize], offset);
            ulong count = big ? U64(countBytes) : U16(countBytes);
            if (count == 0 || count > MaxTiffEntries)
            {
                throw Corrupt($"TIFF image directory at {offset} claims {count} entries");
            }
            long entriesBytes = (long)count * EntrySize;
            long nextPos = offset + countSize + entriesBytes;
            if (nextPos + InlineSize > length)
            {
                throw Corrupt($"TIFF image directory at {offset} with {count} entries runs past the end of the {length}-byte file");
            }
            var entries = new byte[entriesBytes + InlineSize];
            ReadExactly(path, handle, entries, offset + countSize);
            int orientation = 1;
            int bits = 8;
            for (int i = 0; i < (int)count; i++)
            {
                ReadOnlySpan<byte> e = entries.AsSpan(i * EntrySize, EntrySize);
                ushort tag = U16(e);
                ushort type = U16(e[2..]);
                ulong n = big ? U64(e[4..]) : U32(e[4..]);
                ReadOnlySpan<byte> value = e[(big ? 12 : 8)..];
                int size = TypeSize(type);
                if (size > 0)
                {
                    // Saturating: a huge count must fail the check, not overflow past it.
                    ulong bytes = n > (ulong)length ? ulong.MaxValue : n * (ulong)size;
                    if (bytes > (ulong)InlineSize)
                    {
                        ulong at = big ? U64(value) : U32(value);
                        if (bytes > (ulong)length || at > (ulong)length - bytes)
                        {
                            throw Corrupt($"TIFF tag {tag} points to {n} values outside the {length}-byte file");
                        }
                    }
                }
                if (tag == 274 && type == 3)
                {
                    orientation = U16(value);
                }
                else if (tag == 258 && type == 3 && n >= 1)
                {
                    bits = (ulong)size * n <= (ulong)InlineSize ? U16(value) : ReadShortAt((long)(big ? U64(value) : U32(value)));
                }
            }
            onFacts?.Invoke(new TiffFacts(orientation, bits));
            ReadOnlySpan<byte> next = entries.AsSpan((int)entriesBytes, InlineSize);
            ulong nextOffset = big ? U64(next) : U32(next);
            return nextOffset > (ulong)length ? throw Corrupt($"TIFF next-directory offset {nextOffset} lies outside the {length}-byte file") : (long)nextOffset;
        }

        private ushort ReadShortAt(long at)
        {
            Span<byte> b = stackalloc byte[2];
            ReadExactly(path, handle, b, at);
            return U16(b);
        }

        private ImageLoadException Corrupt(string reason) => new(path, ImageLoadFailure.Corrupt, reason);

        private static int TypeSize(ushort type) => type switch
        {
            1 or 2 or 6 or 7 => 1,
            3 or 8 => 2,
            4 or 9 or 11 or 13 => 4,
            5 or 10 or 12 or 16 or 17 or 18 => 8,
            _ => 0,
        };
    }
}
