using System.Buffers.Binary;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Features;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Binary form of what a set keeps of an analysed image (<see cref="ImageAnalysis.WithoutPayload"/>:
/// size, coarse signature, capture time), stored beside its feature-cache entry so that the image
/// stage of a rerun reads a few hundred bytes per image instead of decoding every image's
/// features. Layout (little-endian): magic "SWIS", format version (int32), width and height
/// (int32), capture time in UTC ticks (int64, -1 when absent), signature length (int32) and its
/// floats, then an FNV-1a 64-bit checksum of everything before it. A damaged or foreign entry
/// fails with <see cref="InvalidDataException"/>.
/// </summary>
public static class ImageSummaryCodec
{
    public const int FormatVersion = 1;
    private static readonly byte[] Magic = "SWIS"u8.ToArray();
    private const int Head = 4 + 4 + 8 + 8 + 4;

    public static byte[] Encode(ImageAnalysis analysis)
    {
        ArgumentNullException.ThrowIfNull(analysis);
        var data = new byte[Head + 4 * analysis.Coarse.Length + 8];
        var span = data.AsSpan();
        Magic.CopyTo(span);
        BinaryPrimitives.WriteInt32LittleEndian(span[4..], FormatVersion);
        BinaryPrimitives.WriteInt32LittleEndian(span[8..], analysis.Size.Width);
        BinaryPrimitives.WriteInt32LittleEndian(span[12..], analysis.Size.Height);
        BinaryPrimitives.WriteInt64LittleEndian(span[16..], analysis.CaptureTime?.UtcTicks ?? -1);
        BinaryPrimitives.WriteInt32LittleEndian(span[24..], analysis.Coarse.Length);
        for (int i = 0; i < analysis.Coarse.Length; i++)
        {
            BinaryPrimitives.WriteSingleLittleEndian(span[(Head + 4 * i)..], analysis.Coarse[i]);
        }
        BinaryPrimitives.WriteUInt64LittleEndian(span[^8..], FeatureCacheCodec.Fnv1a(span[..^8]));
        return data;
    }

    /// <summary>The summary as an analysis without payload (<see cref="ImageAnalysis.NotHeld"/>).</summary>
    public static ImageAnalysis Decode(ReadOnlySpan<byte> data)
    {
        if (data.Length < Head + 8 || !data[..4].SequenceEqual(Magic) || BinaryPrimitives.ReadInt32LittleEndian(data[4..]) != FormatVersion)
        {
            throw new InvalidDataException("not an image summary of this format");
        }
        int n = BinaryPrimitives.ReadInt32LittleEndian(data[24..]);
        if (n < 0 || n > 4096 || data.Length != Head + 4 * n + 8
            || FeatureCacheCodec.Fnv1a(data[..^8]) != BinaryPrimitives.ReadUInt64LittleEndian(data[^8..]))
        {
            throw new InvalidDataException("damaged image summary");
        }
        int width = BinaryPrimitives.ReadInt32LittleEndian(data[8..]), height = BinaryPrimitives.ReadInt32LittleEndian(data[12..]);
        if (width <= 0 || height <= 0)
        {
            throw new InvalidDataException("damaged image summary (size)");
        }
        long ticks = BinaryPrimitives.ReadInt64LittleEndian(data[16..]);
        var coarse = new float[n];
        for (int i = 0; i < n; i++)
        {
            coarse[i] = BinaryPrimitives.ReadSingleLittleEndian(data[(Head + 4 * i)..]);
        }
        return new ImageAnalysis
        {
            Size = new ImageSize(width, height),
            Coarse = coarse,
            CaptureTime = ticks < 0 ? null : new DateTimeOffset(ticks, TimeSpan.Zero),
            Payload = ImageAnalysis.NotHeld,
        };
    }
}
