using System.Globalization;

namespace Seamwright.Host.Operations;

/// <summary>What the canary asks of the watcher when events stop arriving.</summary>
internal interface IWatcherControl
{
    /// <summary>Recreates the watcher of this root and queues a full rescan of it.</summary>
    void RestartAndRescan(string root);
}

/// <summary>
/// Proves that each root's watcher still delivers events: every period it rewrites a small
/// canary file in the root, and the watcher's event handler reports the canary back through
/// <see cref="Observed"/>. A canary not seen by the next tick (after the deadline) means the
/// watcher went deaf (buffer overflow, dead inotify thread, dropped share: RELIABILITY.md), so
/// the watcher is recreated and the root rescanned. The canary is ours, never an input: set
/// discovery skips <see cref="FileName"/>. A root we may not write to has no canary (logged
/// once); periodic rescans remain its defence. Thread-safe.
/// </summary>
internal sealed class CanaryProbe(IReadOnlyList<string> roots, IWatcherControl control, TimeProvider time, TimeSpan deadline)
{
    public const string FileName = ".seamwright-canary";

    private readonly Dictionary<string, RootState> _state = roots.ToDictionary(r => Path.GetFullPath(r), _ => new RootState(), StringComparer.Ordinal);

    private sealed class RootState
    {
        public long Written;
        public long Seen;
        public DateTimeOffset? WrittenAt;
        public DateTimeOffset? LastDelivered;
        public int Failures;
        public string? Unavailable;
    }

    public static bool IsCanary(string path) => string.Equals(Path.GetFileName(path), FileName, StringComparison.Ordinal);

    /// <summary>Called from the watcher's event handler for any path; O(1), ignores non-canary paths.</summary>
    public void Observed(string root, string path)
    {
        if (!IsCanary(path) || !_state.TryGetValue(Path.GetFullPath(root), out var s))
        {
            return;
        }
        lock (s)
        {
            s.Seen = s.Written;
            s.LastDelivered = time.GetUtcNow();
        }
    }

    /// <summary>
    /// Checks the previous canary of every root (restarting deaf watchers) and writes the next.
    /// Returns what happened in words, for the log.
    /// </summary>
    public IReadOnlyList<string> Tick()
    {
        var notes = new List<string>();
        var now = time.GetUtcNow();
        foreach (var (root, s) in _state)
        {
            bool deaf;
            lock (s)
            {
                deaf = s.WrittenAt is { } at && s.Seen < s.Written && now - at >= deadline;
                if (deaf)
                {
                    s.Failures++;
                }
            }
            if (deaf)
            {
                notes.Add($"watcher of {root} did not report its canary within {deadline.TotalSeconds:0} s: recreating it and rescanning");
                control.RestartAndRescan(root);
            }
            lock (s)
            {
                if (s.WrittenAt is not null && s.Seen < s.Written && !deaf)
                {
                    continue; // still within the deadline: wait for it
                }
            }
            Write(root, s, now, notes);
        }
        return notes;
    }

    private static void Write(string root, RootState s, DateTimeOffset now, List<string> notes)
    {
        long next;
        lock (s)
        {
            // Counted as written before the bytes land: the watcher's event can arrive before
            // WriteAllText returns, and must then already match this canary.
            next = ++s.Written;
            s.WrittenAt = now;
        }
        try
        {
            File.WriteAllText(Path.Combine(root, FileName),
                string.Create(CultureInfo.InvariantCulture, $"seamwright canary {next} {now:O}\n"));
            lock (s)
            {
                s.Unavailable = null;
            }
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            lock (s)
            {
                s.Written = s.Seen; // nothing was written, so nothing is awaited
                s.WrittenAt = null;
                if (s.Unavailable is null)
                {
                    notes.Add($"no canary in {root} ({ex.Message}); relying on periodic rescans there");
                }
                s.Unavailable = ex.Message;
            }
        }
    }

    /// <summary>Per root: when the watcher last delivered the canary, how often it went deaf, whether the canary works there.</summary>
    public IReadOnlyList<CanaryState> States()
    {
        var now = time.GetUtcNow();
        return _state.Select(kv =>
        {
            lock (kv.Value)
            {
                var s = kv.Value;
                bool overdue = s.WrittenAt is { } at && s.Seen < s.Written && now - at >= deadline;
                return new CanaryState(kv.Key, s.LastDelivered, s.Failures, overdue, s.Unavailable);
            }
        }).OrderBy(c => c.Root, StringComparer.Ordinal).ToList();
    }
}

internal sealed record CanaryState(string Root, DateTimeOffset? LastDelivered, int Failures, bool Overdue, string? Unavailable);
