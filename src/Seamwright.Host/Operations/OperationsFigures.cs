namespace Seamwright.Host.Operations;

/// <summary>
/// The health figures of a running service at one moment: what `seamwright status` shows, what
/// the periodic log line carries, and what the heartbeat file holds (JSON, camelCase).
/// </summary>
internal sealed record OperationsFigures
{
    public required DateTimeOffset At { get; init; }
    public required int ProcessId { get; init; }
    public required bool Healthy { get; init; }

    /// <summary><c>running</c> while the service beats; <c>stopped</c> written once at a clean stop.</summary>
    public string State { get; init; } = ServiceState.Running;

    /// <summary>The machine the service runs on (its process id is checked only there).</summary>
    public string? Machine { get; init; }

    /// <summary>Seconds between heartbeats: a reader calls the file stale after three missed beats.</summary>
    public double HeartbeatSeconds { get; init; }
    public IReadOnlyList<string> Problems { get; init; } = [];

    /// <summary>Sets waiting for a worker (complete but not yet processed).</summary>
    public int QueueDepth { get; init; }

    /// <summary>From a set's last file arriving to its manifest, over the recent sets; seconds.</summary>
    public double? ArrivalToOutputMedianSeconds { get; init; }
    public double? ArrivalToOutputP95Seconds { get; init; }
    public int LatencySamples { get; init; }

    public long Accepted { get; init; }
    public long Weak { get; init; }
    public long Rejected { get; init; }
    public double? AcceptedRate { get; init; }
    public double? WeakRate { get; init; }
    public double? RejectedRate { get; init; }
    public string? RejectionDrift { get; init; }

    /// <summary>Sets waiting past their maximum wait, with how long.</summary>
    public IReadOnlyList<string> StuckSets { get; init; } = [];

    /// <summary>Sets still waiting for their files to settle or for their completion rule, in words.</summary>
    public IReadOnlyList<string> Waiting { get; init; } = [];

    /// <summary>Quarantined files with their reasons.</summary>
    public IReadOnlyList<string> Quarantined { get; init; } = [];

    public long DecodeJobs { get; init; }
    public long WorkerKills { get; init; }
    public long PeakWorkerMegabytes { get; init; }

    public bool IntakePaused { get; init; }
    public string? PauseReason { get; init; }

    /// <summary>Per watched root: changes its watcher missed (found by periodic rescans) and how often it was recreated.</summary>
    public IReadOnlyList<WatcherState> Watchers { get; init; } = [];

    public long RigDeviations { get; init; }
}
