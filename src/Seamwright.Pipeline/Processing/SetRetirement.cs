using System.Text.Json;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Retires a set whose inputs are all gone (its folder removed, or every image of it): every file
/// its newest manifest lists is removed, then the manifest itself (last, so a retirement cut short
/// is finished by the next one), then the folders that became empty up to and including the set's
/// output folder (never the output root). Nothing outside the set's output folder is touched, so
/// nothing in the watched root. The ledger records the set as retired, which is not done: a set
/// folder that comes back is processed again.
/// </summary>
public static class SetRetirement
{
    public const string Reason = "set folder removed: its inputs are gone and its outputs were removed";

    /// <summary>Retires one set; returns how many output files were removed.</summary>
    public static int Retire(ProcessingContext ctx, string setId)
    {
        ArgumentNullException.ThrowIfNull(ctx);
        ArgumentNullException.ThrowIfNull(setId);
        string folder = Path.GetFullPath(OutputLayout.SetFolder(ctx.OutputRoot, setId));
        string manifest = Path.Combine(folder, OutputLayout.ManifestName);
        var listed = Listed(folder, manifest);
        int removed = 0;
        foreach (var full in listed.Where(File.Exists))
        {
            File.Delete(full);
            removed++;
        }
        if (File.Exists(manifest))
        {
            File.Delete(manifest);
            removed++;
        }
        RemoveEmptied(listed.Append(manifest), folder, Path.GetFullPath(ctx.OutputRoot));
        ctx.Store.RetireSet(setId, ctx.Store.GetSet(setId)?.Profile ?? "default", Reason);
        return removed;
    }

    /// <summary>
    /// Retires every set the ledger holds that is not among <paramref name="present"/> (and not
    /// retired already). Returns the ids retired, in ledger order.
    /// </summary>
    public static List<string> RetireMissing(ProcessingContext ctx, IEnumerable<string> present)
    {
        ArgumentNullException.ThrowIfNull(ctx);
        var here = new HashSet<string>(present, StringComparer.Ordinal);
        var retired = new List<string>();
        foreach (var set in ctx.Store.Sets().Where(s => s.State != SetStates.Retired && !here.Contains(s.SetId)))
        {
            Retire(ctx, set.SetId);
            retired.Add(set.SetId);
        }
        return retired;
    }

    /// <summary>The full paths the manifest lists that lie inside the set's output folder (a damaged manifest lists nothing).</summary>
    private static List<string> Listed(string folder, string manifest)
    {
        if (!File.Exists(manifest))
        {
            return [];
        }
        try
        {
            return OutputJson.ReadManifest(manifest).Files
                .Select(f => Path.GetFullPath(OutputLayout.Full(folder, f.Path)))
                .Where(full => Inside(full, folder))
                .Distinct(StringComparer.Ordinal)
                .ToList();
        }
        catch (Exception e) when (e is JsonException or IOException or NotSupportedException or ArgumentException)
        {
            return [];
        }
    }

    private static void RemoveEmptied(IEnumerable<string> files, string setFolder, string outputRoot)
    {
        var folders = files.Select(Path.GetDirectoryName).OfType<string>().Distinct(StringComparer.Ordinal).OrderByDescending(f => f.Length).ToList();
        foreach (var start in folders)
        {
            for (string? dir = start; dir is not null && (dir == setFolder || Inside(dir, setFolder)) && dir != outputRoot; dir = Path.GetDirectoryName(dir))
            {
                if (!Directory.Exists(dir) || Directory.EnumerateFileSystemEntries(dir).Any())
                {
                    break;
                }
                Directory.Delete(dir);
            }
        }
    }

    private static bool Inside(string path, string folder)
    {
        string rel = Path.GetRelativePath(folder, path);
        return rel != "." && !rel.StartsWith("..", StringComparison.Ordinal) && !Path.IsPathRooted(rel);
    }
}
