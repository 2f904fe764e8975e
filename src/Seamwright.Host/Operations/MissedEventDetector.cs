namespace Seamwright.Host.Operations;

/// <summary>Per watched root: how many changes its watcher missed and how often it was recreated.</summary>
internal sealed record WatcherState(string Root, long MissedEvents, int Recreated, DateTimeOffset? LastMissed, string? LastMissedPath);

/// <summary>
/// Tells a silent watcher without writing anything into the watched roots. A change that a
/// periodic rescan finds (a file added or replaced) is a suspect; the watcher reporting that path
/// (its event may still be in flight) clears it. A suspect still unreported after the grace
/// period is a missed event: the watcher of that root went deaf (buffer overflow, dead inotify
/// thread, dropped share: docs/RELIABILITY.md), so it is recreated; the rescan already picked the
/// change up. Recreating a root's watcher clears all that root's suspects, the younger ones too:
/// they were recorded under the old watcher, and the new one cannot report changes that predate
/// it (otherwise one silent spell whose changes span two rescans would recreate it twice). A path
/// the watcher reported less than the grace period before a rescan finds it is not a suspect (the
/// event beat the rescan). Thread-safe; the clock is injected.
/// </summary>
internal sealed class MissedEventDetector(IReadOnlyList<string> roots, TimeProvider time, TimeSpan grace)
{
    /// <summary>Seconds an event may take from the change to the watcher's report (common practice: inotify delivers within milliseconds).</summary>
    public const double DefaultGraceSeconds = 5;

    private readonly Lock _gate = new();
    private readonly Dictionary<(int Root, string Path), DateTimeOffset> _suspects = [];
    private readonly Dictionary<(int Root, string Path), DateTimeOffset> _reported = [];
    private readonly long[] _missed = new long[roots.Count];
    private readonly int[] _recreated = new int[roots.Count];
    private readonly DateTimeOffset?[] _lastMissed = new DateTimeOffset?[roots.Count];
    private readonly string?[] _lastPath = new string?[roots.Count];

    /// <summary>A periodic rescan found this path added or changed.</summary>
    public void Suspect(int root, string path)
    {
        var now = time.GetUtcNow();
        lock (_gate)
        {
            if (_reported.TryGetValue((root, path), out var at) && now - at < grace)
            {
                return;
            }
            _suspects.TryAdd((root, path), now);
        }
    }

    /// <summary>The watcher reported this path (any event).</summary>
    public void Reported(int root, string path)
    {
        var now = time.GetUtcNow();
        lock (_gate)
        {
            _suspects.Remove((root, path));
            _reported[(root, path)] = now;
        }
    }

    /// <summary>Roots whose watcher missed a change past the grace period, with the count and one example path; all their suspects are cleared and the recreation counted.</summary>
    public IReadOnlyList<(int Root, int Missed, string Example)> Due()
    {
        var now = time.GetUtcNow();
        lock (_gate)
        {
            foreach (var old in OlderThanGrace(_reported, now))
            {
                _reported.Remove(old);
            }
            var due = OlderThanGrace(_suspects, now);
            var result = new List<(int, int, string)>();
            foreach (var group in due.GroupBy(k => k.Root).OrderBy(g => g.Key))
            {
                string example = group.Select(k => k.Path).Order(StringComparer.Ordinal).First();
                int n = group.Count();
                _missed[group.Key] += n;
                _recreated[group.Key]++;
                _lastMissed[group.Key] = now;
                _lastPath[group.Key] = example;
                result.Add((group.Key, n, example));
                foreach (var k in _suspects.Keys.Where(k => k.Root == group.Key).ToList())
                {
                    _suspects.Remove(k);
                }
            }
            return result;
        }
    }

    private List<(int Root, string Path)> OlderThanGrace(Dictionary<(int Root, string Path), DateTimeOffset> seen, DateTimeOffset now) =>
        seen.Where(kv => now - kv.Value >= grace).Select(kv => kv.Key).ToList();

    public IReadOnlyList<WatcherState> States()
    {
        lock (_gate)
        {
            return roots.Select((r, i) => new WatcherState(r, _missed[i], _recreated[i], _lastMissed[i], _lastPath[i])).ToList();
        }
    }
}
