namespace Seamwright.Host.Operations;

/// <summary>
/// Liveness of the service's loops. Each loop registers with the longest silence it may keep
/// (its own period plus slack) and calls <see cref="Beat"/> each time round; a loop silent for
/// longer is stalled. The watchdog heartbeat, the heartbeat file and `status` all read this, so
/// a stalled loop stops the heartbeat and systemd restarts the service.
/// </summary>
internal sealed class HealthMonitor(TimeProvider time)
{
    private readonly Dictionary<string, (TimeSpan MaxSilence, DateTimeOffset Last)> _loops = new(StringComparer.Ordinal);
    private readonly Dictionary<string, string> _why = new(StringComparer.Ordinal);
    private string? _fatal;

    public void Register(string loop, TimeSpan maxSilence)
    {
        lock (_loops)
        {
            _loops[loop] = (maxSilence, time.GetUtcNow());
        }
    }

    public void Unregister(string loop)
    {
        lock (_loops)
        {
            _loops.Remove(loop);
        }
    }

    public void Beat(string loop)
    {
        lock (_loops)
        {
            if (_loops.TryGetValue(loop, out var entry))
            {
                _loops[loop] = (entry.MaxSilence, time.GetUtcNow());
            }
            _why.Remove(loop);
        }
    }

    /// <summary>Why <paramref name="loop"/> cannot beat now (its stall, once too long, names this reason); its next beat clears it.</summary>
    public void CannotBeat(string loop, string reason)
    {
        lock (_loops)
        {
            _why[loop] = reason;
        }
    }

    /// <summary>Marks the service unhealthy for good (an unrecoverable error on its way to a non-zero exit).</summary>
    public void ReportFatal(string reason) => Interlocked.CompareExchange(ref _fatal, reason, null);

    public HealthReport Evaluate()
    {
        var now = time.GetUtcNow();
        var stalls = new List<string>();
        lock (_loops)
        {
            foreach (var (name, (maxSilence, last)) in _loops.OrderBy(l => l.Key, StringComparer.Ordinal))
            {
                var silent = now - last;
                if (silent > maxSilence)
                {
                    stalls.Add($"{name} silent for {silent.TotalSeconds:0} s (limit {maxSilence.TotalSeconds:0} s)"
                        + (_why.TryGetValue(name, out string? why) ? ": " + why : ""));
                }
            }
        }
        if (Volatile.Read(ref _fatal) is { } fatal)
        {
            stalls.Insert(0, "fatal: " + fatal);
        }
        return new HealthReport(stalls.Count == 0, stalls, now);
    }
}

internal sealed record HealthReport(bool Healthy, IReadOnlyList<string> Problems, DateTimeOffset At);
