using System.Text.Json;
using Seamwright.Pipeline.Output;

namespace Seamwright.Host.Operations;

/// <summary>
/// heartbeat.json in each output root's state folder: the latest figures, rewritten atomically
/// while the service is healthy and left alone when it is not, so its age tells an outside
/// monitor (or `seamwright status`) whether the service is alive even when it cannot answer.
/// </summary>
internal static class HeartbeatFile
{
    public const string FileName = "heartbeat.json";

    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web) { WriteIndented = true };

    public static void Write(string path, OperationsFigures figures) =>
        AtomicFile.WriteAllBytes(path, JsonSerializer.SerializeToUtf8Bytes(figures, Json));

    /// <summary>The figures in the file, or null when absent or unreadable.</summary>
    public static OperationsFigures? TryRead(string path)
    {
        try
        {
            return File.Exists(path) ? JsonSerializer.Deserialize<OperationsFigures>(File.ReadAllBytes(path), Json) : null;
        }
        catch (Exception ex) when (ex is JsonException or IOException or UnauthorizedAccessException)
        {
            return null;
        }
    }
}
