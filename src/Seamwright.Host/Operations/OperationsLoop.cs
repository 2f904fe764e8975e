using System.Globalization;
using Microsoft.Extensions.Logging;
using Seamwright.Host.Supervision;

namespace Seamwright.Host.Operations;

/// <summary>
/// One pass of the health and housekeeping loop, separated from its timer so tests can drive
/// it: check health and free disk space; build the figures; while healthy, ping the
/// systemd watchdog and rewrite the heartbeat files; log the figures line and run retention
/// when due; start a background read of the ledgers' nodes for the metrics. While unhealthy nothing is pinged or rewritten, so systemd's watchdog and any
/// outside monitor of the heartbeat file see the stall.
/// </summary>
internal sealed class OperationsLoop(
    OperationsOptions options,
    HealthMonitor health,
    OperationsMetrics metrics,
    IServiceFigureSource service,
    TimeProvider time,
    ILogger logger,
    IReadOnlyList<string> heartbeatPaths,
    SystemdNotifier? notifier = null,
    DiskSpaceGuard? disk = null,
    MissedEventDetector? watchers = null,
    WorkerPool? pool = null,
    RetentionSweeper? retention = null,
    NodeBoard? nodes = null)
{
    public const string LoopName = "operations";

    private DateTimeOffset _nextFiguresLog = DateTimeOffset.MinValue;
    private DateTimeOffset _nextRetention = DateTimeOffset.MinValue;
    private string? _lastProblems;
    private string? _lastDrift;

    public OperationsFigures? Last { get; private set; }

    public OperationsFigures Tick()
    {
        var now = time.GetUtcNow();
        health.Beat(LoopName);
        if (disk?.Check() is { } change)
        {
            if (disk.Paused)
            {
                logger.LogWarning("{DiskChange}", change);
            }
            else
            {
                logger.LogInformation("{DiskChange}", change);
            }
        }

        nodes?.Refresh(); // in the background: the tick never waits on the database
        var report = health.Evaluate();
        var problems = report.Problems.ToList();
        if (disk?.PauseReason is { } paused)
        {
            problems.Add(paused);
        }
        var counters = pool?.Counters;
        var figures = metrics.Fill(new OperationsFigures
        {
            At = now,
            ProcessId = Environment.ProcessId,
            Healthy = report.Healthy,
            HeartbeatSeconds = options.HeartbeatSeconds,
            Problems = problems,
            QueueDepth = service.QueueDepth,
            StuckSets = service.StuckSets(),
            Quarantined = service.Quarantined(),
            Waiting = service.Waiting(),
            Machine = Environment.MachineName,
            DecodeJobs = counters?.Jobs ?? 0,
            WorkerKills = counters?.Kills ?? 0,
            PeakWorkerMegabytes = (counters?.PeakWorkerBytes ?? 0) >> 20,
            IntakePaused = disk?.Paused ?? false,
            PauseReason = disk?.PauseReason,
            Watchers = watchers?.States() ?? [],
        });
        Last = figures;

        Announce(report, figures);
        if (figures.RejectionDrift is { } drift && drift != _lastDrift)
        {
            logger.LogWarning("Rejection drift: {Drift}", drift);
        }
        _lastDrift = figures.RejectionDrift;

        if (now >= _nextFiguresLog)
        {
            LogFigures(figures);
            _nextFiguresLog = now + TimeSpan.FromSeconds(options.FiguresLogSeconds);
        }
        if (retention is not null && now >= _nextRetention)
        {
            _nextRetention = now + TimeSpan.FromHours(options.RetentionSweepHours);
            foreach (string line in retention.Sweep(now))
            {
                logger.LogInformation("Retention: {Line}", line);
            }
        }
        return figures;
    }

    /// <summary>While healthy: watchdog, status and heartbeat files; a change of health is logged once.</summary>
    private void Announce(HealthReport report, OperationsFigures figures)
    {
        if (report.Healthy)
        {
            notifier?.Notify("WATCHDOG=1");
            notifier?.Status(StatusReport.OneLine(figures));
            foreach (string path in heartbeatPaths)
            {
                try
                {
                    HeartbeatFile.Write(path, figures);
                }
                catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
                {
                    logger.LogWarning("Cannot write heartbeat file {Path}: {Message}", path, ex.Message);
                }
            }
        }
        string joined = string.Join("; ", report.Problems);
        if (joined != (_lastProblems ?? ""))
        {
            if (report.Healthy)
            {
                logger.LogInformation("Service healthy again");
            }
            else
            {
                logger.LogError("Service unhealthy, heartbeat withheld: {Problems}", joined);
            }
            _lastProblems = joined;
        }
    }

    /// <summary>
    /// At a clean stop: the heartbeat files say <c>stopped</c> (not healthy), so `status` tells a
    /// stop from a hang at once.
    /// </summary>
    public void WriteStopped()
    {
        var last = Last ?? metrics.Fill(new OperationsFigures { At = time.GetUtcNow(), ProcessId = Environment.ProcessId, Healthy = false });
        var stopped = last with { At = time.GetUtcNow(), Healthy = false, State = ServiceState.Stopped, Machine = Environment.MachineName, QueueDepth = 0, Waiting = [] };
        foreach (string path in heartbeatPaths)
        {
            try
            {
                HeartbeatFile.Write(path, stopped);
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
            {
                logger.LogWarning("Cannot write heartbeat file {Path}: {Message}", path, ex.Message);
            }
        }
    }

    private void LogFigures(OperationsFigures f) =>
        logger.LogInformation(
            "Figures: healthy {Healthy}, queue {QueueDepth}, arrival-to-output median {LatencyMedianSeconds} s p95 {LatencyP95Seconds} s over {LatencySamples} sets, " +
            "pairs accepted {Accepted} weak {Weak} rejected {Rejected} (rejected rate {RejectedRate}), stuck sets {StuckSets}, quarantined {Quarantined}, " +
            "decode jobs {DecodeJobs}, worker kills {WorkerKills}, peak worker {PeakWorkerMegabytes} MiB, intake paused {IntakePaused}, rig deviations {RigDeviations}",
            f.Healthy, f.QueueDepth, Round(f.ArrivalToOutputMedianSeconds), Round(f.ArrivalToOutputP95Seconds), f.LatencySamples,
            f.Accepted, f.Weak, f.Rejected, Round(f.RejectedRate), f.StuckSets.Count, f.Quarantined.Count,
            f.DecodeJobs, f.WorkerKills, f.PeakWorkerMegabytes, f.IntakePaused, f.RigDeviations);

    private static string Round(double? v) => v is { } x ? x.ToString("0.###", CultureInfo.InvariantCulture) : "n/a";
}
