using System.Diagnostics.Metrics;
using Seamwright.Core.Estimation;

namespace Seamwright.Host.Operations;

/// <summary>
/// The service's figures as .NET <see cref="System.Diagnostics.Metrics"/> instruments of the meter
/// <c>seamwright</c> (exported as <c>seamwright_*</c> by the HTTP endpoint, or read by any
/// MeterListener such as dotnet-counters). Counters and the latency histogram are fed as the
/// service works; the gauges read the live figures when collected.
/// </summary>
internal sealed class ServiceMeters : IDisposable
{
    public const string MeterName = "seamwright";

    /// <summary>Histogram buckets of arrival-to-output, seconds (common practice: roughly 1-2-5 steps over the range a set takes).</summary>
    public static readonly double[] LatencyBuckets = [1, 2, 5, 10, 20, 30, 60, 120, 300, 600, 1200, 1800, 3600, 7200];

    private readonly Meter _meter = new(MeterName);
    private readonly Counter<long> _sets;
    private readonly Counter<long> _pairs;
    private readonly Histogram<double> _latency;

    public ServiceMeters(ServiceGaugeSource gauges)
    {
        ArgumentNullException.ThrowIfNull(gauges);
        _sets = _meter.CreateCounter<long>("sets_total", description: "Sets finished by this service process, by outcome (done, failed, changed, unchanged, retired).");
        _pairs = _meter.CreateCounter<long>("pairs_total", description: "Pairs estimated by this service process, by outcome (accepted, weak, rejected).");
        _latency = _meter.CreateHistogram<double>("arrival_to_output_seconds", "s",
            "From the change that triggered a set's run (its last file settling, a settings reload) to its manifest, seconds.");
        _meter.CreateObservableGauge("queue_depth", () => gauges.QueueDepth(), description: "Sets complete and waiting for a worker.");
        _meter.CreateObservableGauge("quarantined_files", () => gauges.Last()?.Quarantined.Count ?? 0, description: "Files quarantined after repeated worker crashes, hangs or memory kills.");
        _meter.CreateObservableCounter("worker_kills_total", () => gauges.WorkerKills(), description: "Decode workers killed (time-out, memory cap) or crashed.");
        _meter.CreateObservableGauge("free_disk_bytes", () => gauges.FreeDisk().Select(f => new Measurement<long>(f.Bytes, new KeyValuePair<string, object?>("output_root", f.Root))),
            "By", "Free bytes on the volume of each output root.");
        _meter.CreateObservableGauge("last_heartbeat_timestamp_seconds", () => gauges.Last()?.At.ToUnixTimeMilliseconds() / 1000.0 ?? 0,
            "s", "Unix time of the last heartbeat (written only while healthy).");
        _meter.CreateObservableGauge("healthy", () => gauges.Last() is { Healthy: true } ? 1 : 0, description: "1 while every service loop beats, else 0.");
        _meter.CreateObservableCounter("watcher_missed_changes_total", () => gauges.MissedChanges().Select(m => new Measurement<long>(m.Count, new KeyValuePair<string, object?>("root", m.Root))),
            description: "Changes found by periodic rescans that the watcher never reported, by watched root.");
        _meter.CreateObservableGauge("node_last_heartbeat_timestamp_seconds",
            () => gauges.Nodes().Select(n => new Measurement<double>(new DateTimeOffset(n.LastHeartbeatUtc, TimeSpan.Zero).ToUnixTimeMilliseconds() / 1000.0, NodeLabels(n))),
            "s", "Unix time of each node's last heartbeat in the ledger (the database's clock on a shared ledger), by output root and node; as last read.");
        _meter.CreateObservableGauge("node_heartbeat_age_seconds", () => gauges.Nodes().Select(n => new Measurement<double>(n.HeartbeatAgeSeconds, NodeLabels(n))),
            "s", "Age of each node's last heartbeat when the ledger was last read, by the same clock, by output root and node.");
        _meter.CreateObservableGauge("node_sets", () => gauges.Nodes().Select(n => new Measurement<int>(n.Sets, NodeLabels(n))),
            description: "Sets each node holds a claim on (shared ledger) or has a run in progress of (SQLite), by output root and node; as last read.");
        _meter.CreateObservableGauge("nodes_read_timestamp_seconds",
            () => gauges.NodesReadAt().Select(r => new Measurement<double>(r.At.ToUnixTimeMilliseconds() / 1000.0, new KeyValuePair<string, object?>("output_root", r.Root))),
            "s", "Unix time the nodes of each output root's ledger were last read; stops advancing while the ledger is unreachable (the node gauges then hold the last values read).");
    }

    private static KeyValuePair<string, object?>[] NodeLabels(NodeFigure n) =>
        [new("output_root", n.OutputRoot), new("node", n.Node)];

    public void RecordSet(string outcome) => _sets.Add(1, new KeyValuePair<string, object?>("outcome", outcome));

    public void RecordPair(PairStatus status) =>
        _pairs.Add(1, new KeyValuePair<string, object?>("outcome", status switch { PairStatus.Accepted => "accepted", PairStatus.Weak => "weak", _ => "rejected" }));

    public void RecordLatency(double seconds) => _latency.Record(seconds);

    public void Dispose() => _meter.Dispose();
}

/// <summary>Where the gauges read their values; each delegate is called when the meter is collected.</summary>
internal sealed class ServiceGaugeSource
{
    public Func<int> QueueDepth { get; init; } = () => 0;
    public Func<OperationsFigures?> Last { get; init; } = () => null;
    public Func<long> WorkerKills { get; init; } = () => 0;
    public Func<IEnumerable<(string Root, long Bytes)>> FreeDisk { get; init; } = () => [];
    public Func<IEnumerable<(string Root, long Count)>> MissedChanges { get; init; } = () => [];
    public Func<IEnumerable<NodeFigure>> Nodes { get; init; } = () => [];
    public Func<IEnumerable<(string Root, DateTimeOffset At)>> NodesReadAt { get; init; } = () => [];
}
