using Seamwright.Core.Estimation;

namespace Seamwright.Host.Operations;

/// <summary>
/// Counters the service feeds as it works (pair results, set latencies); thread-safe and cheap.
/// Latencies keep the most recent <c>latencyWindow</c> sets, so the median and 95th percentile
/// describe current behaviour rather than the whole uptime.
/// </summary>
internal sealed class OperationsMetrics(int latencyWindow = 500)
{
    private readonly Lock _gate = new();
    private readonly Queue<double> _latencies = new();
    private readonly RejectionDrift _drift = new();
    private long _accepted;
    private long _weak;
    private long _rejected;
    private long _rigDeviations;
    private string? _driftWarning;

    /// <summary>The instruments fed alongside these counters (null outside the service).</summary>
    public ServiceMeters? Meters { get; set; }

    /// <summary>A set run ended with this outcome (done, failed, changed, ...).</summary>
    public void RecordSet(string outcome) => Meters?.RecordSet(outcome);

    public void RecordPair(PairStatus status)
    {
        Meters?.RecordPair(status);
        lock (_gate)
        {
            switch (status)
            {
                case PairStatus.Accepted:
                    _accepted++;
                    break;
                case PairStatus.Weak:
                    _weak++;
                    break;
                default:
                    _rejected++;
                    break;
            }
            _drift.Add(status != PairStatus.Accepted && status != PairStatus.Weak);
            _driftWarning = _drift.Check();
        }
    }

    /// <summary>A set's outputs were completed (manifest written); <paramref name="arrival"/> is when its last file arrived.</summary>
    public void RecordSetOutput(DateTimeOffset arrival, DateTimeOffset output)
    {
        double seconds = Math.Max(0, (output - arrival).TotalSeconds);
        Meters?.RecordLatency(seconds);
        lock (_gate)
        {
            _latencies.Enqueue(seconds);
            if (_latencies.Count > latencyWindow)
            {
                _latencies.Dequeue();
            }
        }
    }

    public void RecordRigDeviation() => Interlocked.Increment(ref _rigDeviations);

    /// <summary>The current drift warning, or null.</summary>
    public string? DriftWarning
    {
        get
        {
            lock (_gate)
            {
                return _driftWarning;
            }
        }
    }

    /// <summary>Fills the counting part of the figures.</summary>
    public OperationsFigures Fill(OperationsFigures figures)
    {
        lock (_gate)
        {
            long total = _accepted + _weak + _rejected;
            var latencies = _latencies.ToArray();
            return figures with
            {
                Accepted = _accepted,
                Weak = _weak,
                Rejected = _rejected,
                AcceptedRate = total == 0 ? null : (double)_accepted / total,
                WeakRate = total == 0 ? null : (double)_weak / total,
                RejectedRate = total == 0 ? null : (double)_rejected / total,
                RejectionDrift = _driftWarning,
                ArrivalToOutputMedianSeconds = Percentile.Of(latencies, 0.5),
                ArrivalToOutputP95Seconds = Percentile.Of(latencies, 0.95),
                LatencySamples = latencies.Length,
                RigDeviations = Interlocked.Read(ref _rigDeviations),
            };
        }
    }
}
