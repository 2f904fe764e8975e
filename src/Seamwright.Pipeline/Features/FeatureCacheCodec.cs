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
        var bytes = buffer.GetBuffer().AsSpan(0, (int)buffer.Length);
        if (bytes.Length < Magic.Length + 12 || !bytes[..Magic.Length].SequenceEqual(Magic))
        {
            throw new InvalidDataException("Not a Seamwright feature cache entry (bad magic).");
        }
        ulong stored = BitConverter.ToUInt64(bytes[^8..]);
        if (!BitConverter.IsLittleEndian)
        {
            stored = System.Buffers.Binary.BinaryPrimitives.ReverseEndianness(stored);
        }
        if (Fnv1a(bytes[..^8]) != stored)
        {
            throw new InvalidDataException("Feature cache entry is damaged (checksum mismatch).");
        }
        buffer.Position = Magic.Length;
        try
        {
            using var r = new BinaryReader(buffer, Encoding.UTF8, leaveOpen: true);
            int version = r.ReadInt32();
            if (version != FormatVersion)
            {
                throw new InvalidDataException($"Feature cache format {version} is not supported (expected {FormatVersion}).");
            }
            string pattern = r.ReadString();
            string fingerprint = r.ReadString();
            var full = new ImageSize(r.ReadInt32(), r.ReadInt32());
            var working = new ImageSize(r.ReadInt32(), r.ReadInt32());
            double scale = r.ReadDouble();
            int count = r.ReadInt32();
            int radius = r.ReadInt32();
            if (count < 0 || count > MaxKeypoints || radius < 0 || radius > MaxPatchRadius)
            {
                throw new InvalidDataException($"Feature cache entry has implausible counts ({count} keypoints, patch radius {radius}).");
            }
            var keypoints = new Keypoint[count];
            for (int i = 0; i < count; i++)
            {
                keypoints[i] = new Keypoint(r.ReadSingle(), r.ReadSingle(), r.ReadSingle(), r.ReadSingle(), r.ReadSingle(), r.ReadInt32());
            }
            var descriptors = new Descriptor256[count];
            for (int i = 0; i < count; i++)
            {
                descriptors[i] = new Descriptor256(r.ReadUInt64(), r.ReadUInt64(), r.ReadUInt64(), r.ReadUInt64());
            }
            int side = 2 * radius + 1;
            long patchBytes = (long)count * side * side;
            if (patchBytes > buffer.Length - 8 - buffer.Position)
            {
                throw new InvalidDataException("Feature cache entry has the wrong length.");
            }
            var patches = r.ReadBytes((int)patchBytes);
            var (compact, mask) = ReadCompact(r, full);
            if (buffer.Position != buffer.Length - 8)
            {
                throw new InvalidDataException("Feature cache entry has the wrong length.");
            }
            return new ImageFeatures(full, working, scale, keypoints, descriptors, radius, patches, pattern, fingerprint, compact, mask);
        }
        catch (EndOfStreamException e)
        {
            throw new InvalidDataException("Feature cache entry is truncated.", e);
        }
    }

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

    private static (ScaledImage?, GrayImage?) ReadCompact(BinaryReader r, ImageSize full)
    {
        byte flags = r.ReadByte();
        if (flags is not (0 or 1 or 3))
        {
            throw new InvalidDataException($"Feature cache entry has unknown compact-copy flags ({flags}).");
        }
        if (flags == 0)
        {
            return (null, null);
        }
        int width = r.ReadInt32(), height = r.ReadInt32();
        double scale = r.ReadDouble();
        if (width < 1 || height < 1 || width > full.Width || height > full.Height || !double.IsFinite(scale) || scale < 1)
        {
            throw new InvalidDataException($"Feature cache entry has an implausible compact copy ({width} x {height}, scale {scale}).");
        }
        int pixels = width * height;
        var image = new GrayImage(width, height, ReadExactly(r, pixels));
        var mask = (flags & 2) != 0 ? new GrayImage(width, height, ReadExactly(r, pixels)) : null;
        return (new ScaledImage(image, scale), mask);
    }

    private static byte[] ReadExactly(BinaryReader r, int count)
    {
        var bytes = r.ReadBytes(count);
        return bytes.Length == count ? bytes : throw new EndOfStreamException();
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
