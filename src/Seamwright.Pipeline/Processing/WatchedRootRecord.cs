using System.Text.Json;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// <c>.seamwright/watched-root.json</c> in an output root: the watched root it serves, written
/// when a session opens it, so that `rerun SET` and `status` can find the root a set belongs to
/// from the output side (the watched root may have been given to `watch` on the command line).
/// </summary>
public static class WatchedRootRecord
{
    public const string FileName = "watched-root.json";

    private sealed record Body(string WatchedRoot);

    public static string PathIn(string outputRoot) => System.IO.Path.Combine(outputRoot, StateStore.StateFolder, FileName);

    public static void Write(string outputRoot, string watchedRoot)
    {
        string full = System.IO.Path.GetFullPath(watchedRoot).TrimEnd('/', '\\');
        if (Read(outputRoot) == full)
        {
            return;
        }
        Directory.CreateDirectory(System.IO.Path.Combine(outputRoot, StateStore.StateFolder));
        AtomicFile.WriteAllBytes(PathIn(outputRoot), JsonSerializer.SerializeToUtf8Bytes(new Body(full)));
    }

    /// <summary>The watched root recorded in this output root, or null when none (or unreadable).</summary>
    public static string? Read(string outputRoot)
    {
        try
        {
            string p = PathIn(outputRoot);
            return File.Exists(p) ? JsonSerializer.Deserialize<Body>(File.ReadAllBytes(p), new JsonSerializerOptions(JsonSerializerDefaults.Web))?.WatchedRoot : null;
        }
        catch (Exception e) when (e is IOException or JsonException or UnauthorizedAccessException)
        {
            return null;
        }
    }
}
