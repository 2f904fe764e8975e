using System.Buffers.Binary;
using System.Text;
using Seamwright.Core.Features;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;

namespace Seamwright.Pipeline.Features;

/// <summary>
/// Binary form of <see cref="ImageFeatures"/> for the feature cache. Layout (little-endian):
/// magic "SWFC", format version (int32), pattern version and settings fingerprint (length-prefixed
/// UTF-8), full and working size (4 x int32), working scale (float64), keypoint count, patch radius, then per keypoint
/// X, Y, Scale, Angle, Response (float32) and Level (int32), then the descriptors (4 x uint64 each),
/// then the patches, then the compact gray copy (format 2: a flags byte, 1 = copy present, 2 = mask
/// present; then width, height (int32), scale (float64), its pixels and the mask's pixels), and last
/// an FNV-1a 64-bit checksum of everything before it. A reader
/// rejects any other format version, a bad checksum or a truncated stream with
/// <see cref="InvalidDataException"/>.
/// </summary>
public static class FeatureCacheCodec
{
    public const int FormatVersion = 2;
    private static readonly byte[] Magic = "SWFC"u8.ToArray();
    private const int MaxKeypoints = 10_000_000;
    private const int MaxPatchRadius = 512;

    public static void Write(Stream stream, ImageFeatures features)
    {
        ArgumentNullException.ThrowIfNull(stream);
        ArgumentNullException.ThrowIfNull(features);
        using var buffer = new MemoryStream();
        using (var w = new BinaryWriter(buffer, Encoding.UTF8, leaveOpen: true))
        {
            w.Write(Magic);
            w.Write(FormatVersion);
            w.Write(features.PatternVersion);
            w.Write(features.SettingsFingerprint);
            w.Write(features.FullSize.Width);
            w.Write(features.FullSize.Height);
            w.Write(features.WorkingSize.Width);
            w.Write(features.WorkingSize.Height);
            w.Write(features.WorkingScale);
            w.Write(features.Count);
            w.Write(features.PatchRadius);
            foreach (var k in features.Keypoints)
            {
                w.Write(k.X);
                w.Write(k.Y);
                w.Write(k.Scale);
                w.Write(k.Angle);
                w.Write(k.Response);
                w.Write(k.Level);
            }
            foreach (var d in features.Descriptors)
            {
                w.Write(d.W0);
                w.Write(d.W1);
                w.Write(d.W2);
                w.Write(d.W3);
            }
            w.Write(features.Patches);
            WriteCompact(w, features);
        }
        ulong checksum = Fnv1a(buffer.GetBuffer().AsSpan(0, (int)buffer.Length));
        buffer.Write(BitConverter.IsLittleEndian ? BitConverter.GetBytes(checksum) : [.. BitConverter.GetBytes(checksum).Reverse()]);
        buffer.Position = 0;
        buffer.CopyTo(stream);
    }

    public static ImageFeatures Read(Stream stream)
    {
        ArgumentNullException.ThrowIfNull(stream);
        using var buffer = new MemoryStream();
        stream.CopyTo(buffer);
        return Read(buffer.GetBuffer().AsSpan(0, (int)buffer.Length));
    }

    /// <summary>
    /// Reads an entry straight from its bytes (no copy of the entry: only the arrays the features
    /// keep are allocated, which matters when a set's pairs read thousands of entries).
    /// </summary>
    public static ImageFeatures Read(ReadOnlySpan<byte> bytes)
    {
        if (bytes.Length < Magic.Length + 12 || !bytes[..Magic.Length].SequenceEqual(Magic))
        {
            throw new InvalidDataException("Not a Seamwright feature cache entry (bad magic).");
        }
        ulong stored = BinaryPrimitives.ReadUInt64LittleEndian(bytes[^8..]);
        if (Fnv1a(bytes[..^8]) != stored)
        {
            throw new InvalidDataException("Feature cache entry is damaged (checksum mismatch).");
        }
        var r = new SpanReader(bytes[..^8], Magic.Length);
        int version = r.Int32();
        if (version != FormatVersion)
        {
            throw new InvalidDataException($"Feature cache format {version} is not supported (expected {FormatVersion}).");
        }
        string pattern = r.String();
        string fingerprint = r.String();
        var full = new ImageSize(r.Int32(), r.Int32());
        var working = new ImageSize(r.Int32(), r.Int32());
        double scale = r.Double();
        int count = r.Int32();
        int radius = r.Int32();
        if (count < 0 || count > MaxKeypoints || radius < 0 || radius > MaxPatchRadius)
        {
            throw new InvalidDataException($"Feature cache entry has implausible counts ({count} keypoints, patch radius {radius}).");
        }
        int side = 2 * radius + 1;
        if ((long)count * (KeypointBytes + DescriptorBytes + (long)side * side) > r.Remaining)
        {
            throw new InvalidDataException("Feature cache entry has the wrong length.");
        }
        var keypoints = new Keypoint[count];
        for (int i = 0; i < count; i++)
        {
            keypoints[i] = new Keypoint(r.Single(), r.Single(), r.Single(), r.Single(), r.Single(), r.Int32());
        }
        var descriptors = new Descriptor256[count];
        for (int i = 0; i < count; i++)
        {
            descriptors[i] = new Descriptor256(r.UInt64(), r.UInt64(), r.UInt64(), r.UInt64());
        }
        var patches = r.Bytes(count * side * side);
        var (compact, mask) = ReadCompact(ref r, full);
        if (r.Remaining != 0)
        {
            throw new InvalidDataException("Feature cache entry has the wrong length.");
        }
        return new ImageFeatures(full, working, scale, keypoints, descriptors, radius, patches, pattern, fingerprint, compact, mask);
    }

    private const int KeypointBytes = 6 * 4;
    private const int DescriptorBytes = 4 * 8;

    private static void WriteCompact(BinaryWriter w, ImageFeatures features)
    {
        var c = features.Compact;
        w.Write((byte)((c is null ? 0 : 1) | (features.CompactMask is null ? 0 : 2)));
        if (c is null)
        {
            return;
        }
        w.Write(c.Image.Width);
        w.Write(c.Image.Height);
        w.Write(c.Scale);
        w.Write(c.Image.Pixels);
        if (features.CompactMask is { } mask)
        {
            w.Write(mask.Pixels);
        }
    }

    private static (ScaledImage?, GrayImage?) ReadCompact(ref SpanReader r, ImageSize full)
    {
        byte flags = r.Byte();
        if (flags is not (0 or 1 or 3))
        {
            throw new InvalidDataException($"Feature cache entry has unknown compact-copy flags ({flags}).");
        }
        if (flags == 0)
        {
            return (null, null);
        }
        int width = r.Int32(), height = r.Int32();
        double scale = r.Double();
        if (width < 1 || height < 1 || width > full.Width || height > full.Height || !double.IsFinite(scale) || scale < 1)
        {
            throw new InvalidDataException($"Feature cache entry has an implausible compact copy ({width} x {height}, scale {scale}).");
        }
        int pixels = width * height;
        var image = new GrayImage(width, height, r.Bytes(pixels));
        var mask = (flags & 2) != 0 ? new GrayImage(width, height, r.Bytes(pixels)) : null;
        return (new ScaledImage(image, scale), mask);
    }

    /// <summary>Little-endian fields of an entry in the layout <see cref="BinaryWriter"/> wrote them; running past the end is a truncated entry.</summary>
    private ref struct SpanReader(ReadOnlySpan<byte> data, int position)
    {
        private readonly ReadOnlySpan<byte> _data = data;
        private int _at = position;

        public readonly int Remaining => _data.Length - _at;

        private ReadOnlySpan<byte> Take(int n)
        {
            if (n < 0 || n > Remaining)
            {
                throw new InvalidDataException("Feature cache entry is truncated.");
            }
            var s = _data.Slice(_at, n);
            _at += n;
            return s;
        }

        public byte Byte() => Take(1)[0];

        public int Int32() => BinaryPrimitives.ReadInt32LittleEndian(Take(4));

        public float Single() => BinaryPrimitives.ReadSingleLittleEndian(Take(4));

        public double Double() => BinaryPrimitives.ReadDoubleLittleEndian(Take(8));

        public ulong UInt64() => BinaryPrimitives.ReadUInt64LittleEndian(Take(8));

        public byte[] Bytes(int n) => Take(n).ToArray();

        /// <summary>A string as <see cref="BinaryWriter.Write(string)"/> writes it: 7-bit encoded byte length, then UTF-8.</summary>
        public string String()
        {
            int length = 0;
            for (int shift = 0; ; shift += 7)
            {
                if (shift > 28)
                {
                    throw new InvalidDataException("Feature cache entry has a damaged string length.");
                }
                byte b = Byte();
                length |= (b & 0x7F) << shift;
                if ((b & 0x80) == 0)
                {
                    break;
                }
            }
            return Encoding.UTF8.GetString(Take(length));
        }
    }

    /// <summary>FNV-1a, 64-bit (Fowler, Noll, Vo); also the checksum of <c>Processing/ImageSummaryCodec</c>.</summary>
    internal static ulong Fnv1a(ReadOnlySpan<byte> data)
    {
        ulong h = 14695981039346656037UL;
        foreach (byte b in data)
        {
            h = (h ^ b) * 1099511628211UL;
        }
        return h;
    }
}
