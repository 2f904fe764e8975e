using System.Buffers.Binary;

namespace Seamwright.Tests.Shared;

/// <summary>PNG chunks with their CRC, for tests that craft PNG files byte by byte (ISO/IEC 15948).</summary>
internal static class PngChunks
{
    /// <summary>Length, type, data and CRC-32 of one chunk.</summary>
    public static byte[] Chunk(string type, ReadOnlySpan<byte> data)
    {
        var chunk = new byte[12 + data.Length];
        BinaryPrimitives.WriteUInt32BigEndian(chunk, (uint)data.Length);
        System.Text.Encoding.ASCII.GetBytes(type).CopyTo(chunk, 4);
        data.CopyTo(chunk.AsSpan(8));
        BinaryPrimitives.WriteUInt32BigEndian(chunk.AsSpan(8 + data.Length), Crc32(chunk.AsSpan(4, 4 + data.Length)));
        return chunk;
    }

    /// <summary>CRC-32 as PNG defines it (annex D: polynomial 0xEDB88320, reflected).</summary>
    private static uint Crc32(ReadOnlySpan<byte> data)
    {
        uint crc = 0xFFFFFFFF;
        foreach (byte d in data)
        {
            crc ^= d;
            for (int k = 0; k < 8; k++)
            {
                crc = (crc & 1) != 0 ? 0xEDB88320 ^ (crc >> 1) : crc >> 1;
            }
        }
        return ~crc;
    }
}
