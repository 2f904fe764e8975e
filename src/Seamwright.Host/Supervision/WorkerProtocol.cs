using System.Buffers.Binary;
using System.Text.Json;
using System.Text.Json.Serialization;

namespace Seamwright.Host.Supervision;

/// <summary>
/// Parent-worker protocol over the worker's stdin and stdout: each message is one frame, a
/// 4-byte little-endian payload length followed by that many bytes of UTF-8 JSON. The worker
/// first sends a <see cref="WorkerHello"/>, then answers each <see cref="WorkerRequest"/> with
/// one <see cref="WorkerReply"/> in order. Nothing else is written to the worker's stdout
/// (its Console.Out goes to stderr), so a stray write cannot corrupt a frame.
/// </summary>
internal static class WorkerProtocol
{
    public const int Version = 1;

    /// <summary>Largest frame either side accepts; a longer length prefix means a corrupt stream.</summary>
    public const int MaxFrameBytes = 1 << 20;

    public static readonly JsonSerializerOptions Json = new()
    {
        PropertyNamingPolicy = JsonNamingPolicy.CamelCase,
        DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
    };

    public static async Task WriteAsync<T>(Stream stream, T message, CancellationToken cancellationToken)
    {
        byte[] payload = JsonSerializer.SerializeToUtf8Bytes(message, Json);
        if (payload.Length > MaxFrameBytes)
        {
            throw new InvalidDataException($"frame of {payload.Length} bytes exceeds {MaxFrameBytes}");
        }
        byte[] frame = new byte[4 + payload.Length];
        BinaryPrimitives.WriteInt32LittleEndian(frame, payload.Length);
        payload.CopyTo(frame, 4);
        await stream.WriteAsync(frame, cancellationToken);
        await stream.FlushAsync(cancellationToken);
    }

    /// <summary>The next message, or default when the stream ended cleanly before a frame began.</summary>
    public static async Task<T?> ReadAsync<T>(Stream stream, CancellationToken cancellationToken)
    {
        byte[] header = new byte[4];
        if (!await ReadExactlyOrEndAsync(stream, header, cancellationToken))
        {
            return default;
        }
        int length = BinaryPrimitives.ReadInt32LittleEndian(header);
        if (length <= 0 || length > MaxFrameBytes)
        {
            throw new InvalidDataException($"frame length {length} outside 1..{MaxFrameBytes}");
        }
        byte[] payload = new byte[length];
        if (!await ReadExactlyOrEndAsync(stream, payload, cancellationToken))
        {
            throw new EndOfStreamException("stream ended inside a frame");
        }
        return JsonSerializer.Deserialize<T>(payload, Json) ?? throw new InvalidDataException("empty message");
    }

    private static async Task<bool> ReadExactlyOrEndAsync(Stream stream, byte[] buffer, CancellationToken cancellationToken)
    {
        int read = 0;
        while (read < buffer.Length)
        {
            int n = await stream.ReadAsync(buffer.AsMemory(read), cancellationToken);
            if (n == 0)
            {
                if (read == 0)
                {
                    return false;
                }
                throw new EndOfStreamException("stream ended inside a frame");
            }
            read += n;
        }
        return true;
    }
}

/// <summary>First frame from a worker: it started, which limits it applied.</summary>
internal sealed record WorkerHello(int Protocol, int ProcessId, string Limits);

/// <summary>
/// One job: load the image at <paramref name="Path"/> within the given budgets and extract its
/// features. When <paramref name="FeatureOutputPath"/> is set the worker writes the features
/// there (atomic write) instead of sending them back; the reply stays small. With
/// <paramref name="Engine"/> the worker runs that pair engine's analysis with the given
/// settings (JSON) and writes the engine's cache encoding; without it, the loader and the
/// feature extractor with default settings, written in the feature cache codec. With
/// <paramref name="PreviewMaxSide"/> above 0 it writes the image's colour preview instead.
/// </summary>
internal sealed record WorkerRequest(long Id, string Path, long MaxFileBytes, long MaxPixels, string? FeatureOutputPath = null,
    string? Engine = null, string? FeaturesJson = null, string? LimitsJson = null, int PreviewMaxSide = 0);

/// <summary>
/// Which analysis a job runs: a pair engine by name with its settings as JSON; with
/// <paramref name="PreviewMaxSide"/> above 0, the colour preview of the image at that long side
/// instead (<see cref="PreviewJob"/>, limits from <paramref name="LimitsJson"/>).
/// </summary>
internal sealed record WorkerJobSpec(string Engine, string FeaturesJson, string LimitsJson, int PreviewMaxSide = 0);

/// <summary>
/// The answer to one job. <paramref name="Ok"/> false means the file is bad (the reason says
/// why); the worker itself is fine unless <paramref name="Recycle"/> asks to be replaced
/// (after an out-of-memory the process state is suspect).
/// </summary>
internal sealed record WorkerReply(
    long Id,
    bool Ok,
    string? Reason,
    int Width,
    int Height,
    string? Format,
    string? Summary,
    long PeakWorkingSetBytes,
    bool Recycle,
    int FeatureCount = 0,
    string? FailureKind = null);
