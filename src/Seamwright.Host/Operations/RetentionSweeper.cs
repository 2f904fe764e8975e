using System.Globalization;
using System.Text;
using System.Text.Json;
using Seamwright.Pipeline.Output;

namespace Seamwright.Host.Operations;

/// <summary>What retention needs from the service's ledger: run times and pruning of old runs.</summary>
internal interface IRunRetention
{
    /// <summary>Removes the outputs and ledger rows of runs beyond the newest <paramref name="keepOld"/> + 1 per set; returns what was removed, in words.</summary>
    IReadOnlyList<string> PruneOldRuns(int keepOld);

    /// <summary>When a run started; null when unknown.</summary>
    DateTimeOffset? RunStartedAt(long run);

    /// <summary>Runs <paramref name="rewrite"/> while no record is being appended to the confidence log at <paramref name="path"/>.</summary>
    void WithConfidenceLogLocked(string path, Action rewrite);
}

/// <summary>
/// Applies the retention settings: deletes log files and feature cache entries older than their
/// limits (a missing cache entry is recomputed, never wrong), drops confidence-log records of
/// runs older than the limit (rewritten atomically under the log's append lock), and asks the
/// service to prune old runs. The newest log file is always kept.
/// </summary>
internal sealed class RetentionSweeper(
    OperationsOptions options,
    string? logFolder,
    IReadOnlyList<string> featureCacheFolders,
    IReadOnlyList<string> confidenceLogs,
    IRunRetention? runs)
{
    public IReadOnlyList<string> Sweep(DateTimeOffset now)
    {
        var notes = new List<string>();
        if (options.LogRetentionDays > 0 && logFolder is not null && Directory.Exists(logFolder))
        {
            var files = new DirectoryInfo(logFolder).GetFiles().OrderByDescending(f => f.LastWriteTimeUtc).Skip(1);
            int n = DeleteOlder(files, now - TimeSpan.FromDays(options.LogRetentionDays));
            Note(notes, n, $"log files older than {options.LogRetentionDays} days");
        }
        if (options.FeatureCacheRetentionDays > 0)
        {
            foreach (string folder in featureCacheFolders.Where(Directory.Exists))
            {
                var files = new DirectoryInfo(folder).EnumerateFiles("*", SearchOption.AllDirectories);
                int n = DeleteOlder(files, now - TimeSpan.FromDays(options.FeatureCacheRetentionDays));
                RemoveEmptyFolders(folder);
                Note(notes, n, $"feature cache entries older than {options.FeatureCacheRetentionDays} days in {folder}");
            }
        }
        if (options.ConfidenceLogRetentionDays > 0 && runs is not null)
        {
            var cutoff = now - TimeSpan.FromDays(options.ConfidenceLogRetentionDays);
            foreach (string log in confidenceLogs.Where(File.Exists))
            {
                int dropped = 0;
                runs.WithConfidenceLogLocked(log, () => dropped = DropRecords(log, run => runs.RunStartedAt(run) is { } t && t < cutoff));
                Note(notes, dropped, $"confidence-log records of runs older than {options.ConfidenceLogRetentionDays} days in {log}");
            }
        }
        if (runs is not null)
        {
            notes.AddRange(runs.PruneOldRuns(options.KeepOldRuns));
        }
        return notes;
    }

    /// <summary>Rewrites a JSON Lines log without the records whose "run" matches; returns how many were dropped.</summary>
    public static int DropRecords(string path, Func<long, bool> dropRun)
    {
        var kept = new StringBuilder();
        int dropped = 0;
        foreach (string line in File.ReadLines(path))
        {
            if (line.Length == 0)
            {
                continue;
            }
            bool drop = false;
            try
            {
                using var doc = JsonDocument.Parse(line);
                drop = doc.RootElement.TryGetProperty("run", out var run) && run.TryGetInt64(out long id) && dropRun(id);
            }
            catch (JsonException)
            {
                // An unreadable line is kept: retention never destroys what it cannot judge.
            }
            if (drop)
            {
                dropped++;
            }
            else
            {
                kept.Append(line).Append('\n');
            }
        }
        if (dropped > 0)
        {
            AtomicFile.WriteAllText(path, kept.ToString());
        }
        return dropped;
    }

    private static int DeleteOlder(IEnumerable<FileInfo> files, DateTimeOffset cutoff)
    {
        int n = 0;
        foreach (var f in files)
        {
            if (f.LastWriteTimeUtc < cutoff.UtcDateTime && !AtomicFile.IsTemporary(f.FullName))
            {
                try
                {
                    f.Delete();
                    n++;
                }
                catch (IOException)
                {
                }
                catch (UnauthorizedAccessException)
                {
                }
            }
        }
        return n;
    }

    private static void RemoveEmptyFolders(string root)
    {
        foreach (string dir in Directory.EnumerateDirectories(root, "*", SearchOption.AllDirectories).OrderByDescending(d => d.Length).ToList())
        {
            if (!Directory.EnumerateFileSystemEntries(dir).Any())
            {
                Directory.Delete(dir);
            }
        }
    }

    private static void Note(List<string> notes, int n, string what)
    {
        if (n > 0)
        {
            notes.Add(string.Create(CultureInfo.InvariantCulture, $"deleted {n} {what}"));
        }
    }
}
