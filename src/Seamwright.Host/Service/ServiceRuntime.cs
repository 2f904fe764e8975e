using System.Threading.Channels;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Service;

/// <summary>A change hint from a watcher: a path under a root, or a request to rescan the root.</summary>
internal readonly record struct WatchHint(int Root, string? Path);

/// <summary>Whether a rescan is due this round and why.</summary>
internal enum RescanKind
{
    None,
    Requested,
    Periodic,
}

/// <summary>A complete set handed to the workers.</summary>
internal sealed record SetJob(int Root, SetInputs Set, bool Incomplete);

/// <summary>A worker's report back to the scheduler.</summary>
internal sealed record SetJobResult(int Root, SetOutcome Outcome);

/// <summary>
/// What the service loops share: the opened roots, the bounded channels linking them
/// (watchers -> scheduler -> workers -> scheduler), the current settings, and the first fatal
/// error (which makes the process exit non-zero).
/// </summary>
internal sealed class ServiceRuntime
{
    private int _rescanRequested;
    private int _periodicRescanRequested;

    public ServiceRuntime(IReadOnlyList<RootSession> roots, SeamwrightOptions options)
    {
        Roots = roots;
        Options = options;
        int cap = options.Service.QueueCapacity;
        Hints = Channel.CreateBounded<WatchHint>(new BoundedChannelOptions(cap) { FullMode = BoundedChannelFullMode.DropWrite, SingleReader = true });
        Jobs = Channel.CreateBounded<SetJob>(new BoundedChannelOptions(Math.Max(1, options.Service.MaxParallelSets)) { SingleWriter = true });
        Results = Channel.CreateBounded<SetJobResult>(new BoundedChannelOptions(cap) { SingleReader = true });
    }

    public IReadOnlyList<RootSession> Roots { get; }

    /// <summary>The scheduler's clock (the system clock; a fake one in tests).</summary>
    public TimeProvider Time { get; init; } = TimeProvider.System;

    public SeamwrightOptions Options { get; set; }

    public Channel<WatchHint> Hints { get; }

    public Channel<SetJob> Jobs { get; }

    public Channel<SetJobResult> Results { get; }

    public Exception? Fatal { get; private set; }

    /// <summary>The downstream hand-off started after each published set (null in tests that run the loops bare).</summary>
    public Operations.SetDoneHandoff? Handoff { get; init; }

    /// <summary>Supervised decoding and the health loop (null in tests that run the loops bare).</summary>
    public ServiceOperations? Ops { get; set; }

    /// <summary>True while the shared ledger cannot be reached (set by the lease loop and the scheduler): no new set is taken.</summary>
    public volatile bool LedgerDown;

    /// <summary>Set when the settings were reloaded; the scheduler re-checks every set's fingerprint.</summary>
    public volatile bool SettingsChanged;

    /// <summary>Recreates the watcher of a root (set by the watcher loop).</summary>
    public Action<int>? RestartWatcher { get; set; }

    /// <summary>O(1) hint from a watcher thread; when the channel is full the event is replaced by a full rescan.</summary>
    public void Hint(int root, string path)
    {
        Ops?.Missed?.Reported(root, path);
        if (!Hints.Writer.TryWrite(new WatchHint(root, path)))
        {
            RequestRescan();
        }
    }

    public void RequestRescan() => Interlocked.Exchange(ref _rescanRequested, 1);

    /// <summary>The timer's rescan: what it finds that no event reported shows a silent watcher.</summary>
    public void RequestPeriodicRescan() => Interlocked.Exchange(ref _periodicRescanRequested, 1);

    /// <summary>Takes both requests; a requested rescan (events, errors) wins over a periodic one in the same round.</summary>
    public RescanKind TakeRescanRequest()
    {
        bool requested = Interlocked.Exchange(ref _rescanRequested, 0) == 1;
        bool periodic = Interlocked.Exchange(ref _periodicRescanRequested, 0) == 1;
        return requested ? RescanKind.Requested : periodic ? RescanKind.Periodic : RescanKind.None;
    }

    public void SetFatal(Exception e)
    {
        lock (this)
        {
            Fatal ??= e;
        }
    }
}
