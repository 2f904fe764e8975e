using System.Globalization;
using System.Text;

namespace Seamwright.Host.Operations;

/// <summary>The figures as text: a block for `seamwright status`, one line for systemd's STATUS=.</summary>
internal static class StatusReport
{
    public static string OneLine(OperationsFigures f) => string.Create(CultureInfo.InvariantCulture,
        $"{(f.Healthy ? "healthy" : "UNHEALTHY")}; queue {f.QueueDepth}; p95 {Seconds(f.ArrivalToOutputP95Seconds)}; rejected {Rate(f.RejectedRate)}; quarantined {f.Quarantined.Count}{(f.IntakePaused ? "; INTAKE PAUSED" : "")}");

    /// <summary>
    /// The service block of `seamwright status`: the judged state (running, stopped,
    /// not-responding, not-started) and, while a service runs or stopped responding, the figures of
    /// its last heartbeat; <paramref name="now"/> judges ages.
    /// </summary>
    public static string Render(string state, string? note, OperationsFigures? f, DateTimeOffset now)
    {
        var w = new StringBuilder();
        if (f is null || state == ServiceState.NotStarted)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"  service: not started ({note})");
            return w.ToString();
        }
        var age = now - f.At;
        if (state == ServiceState.Stopped)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"  service: stopped ({note}), pid {f.ProcessId}, last heartbeat {Age(age)} ago");
            return w.ToString();
        }
        string head = state == ServiceState.NotResponding
            ? $"NOT RESPONDING (heartbeat {Age(age)} old; last known state follows)"
            : f.Healthy ? "running, healthy" : "running, UNHEALTHY";
        w.AppendLine(CultureInfo.InvariantCulture, $"  service: {head}, pid {f.ProcessId}, heartbeat {Age(age)} ago");
        foreach (string p in f.Problems)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"    problem: {p}");
        }
        w.AppendLine(CultureInfo.InvariantCulture, $"  queue depth: {f.QueueDepth} sets");
        w.AppendLine(CultureInfo.InvariantCulture,
            $"  arrival to output: median {Seconds(f.ArrivalToOutputMedianSeconds)}, 95th percentile {Seconds(f.ArrivalToOutputP95Seconds)} (last {f.LatencySamples} sets)");
        w.AppendLine(CultureInfo.InvariantCulture,
            $"  pairs: {f.Accepted} accepted ({Rate(f.AcceptedRate)}), {f.Weak} weak ({Rate(f.WeakRate)}), {f.Rejected} rejected ({Rate(f.RejectedRate)})");
        if (f.RejectionDrift is { } drift)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"  WARNING: {drift}");
        }
        w.AppendLine(CultureInfo.InvariantCulture, $"  stuck sets: {f.StuckSets.Count}");
        foreach (string s in f.StuckSets)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"    {s}");
        }
        w.AppendLine(CultureInfo.InvariantCulture, $"  quarantined files: {f.Quarantined.Count}");
        foreach (string q in f.Quarantined)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"    {q}");
        }
        w.AppendLine(CultureInfo.InvariantCulture, $"  decoding: {f.DecodeJobs} jobs, {f.WorkerKills} worker kills, peak worker {f.PeakWorkerMegabytes} MiB");
        if (f.IntakePaused)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"  INTAKE PAUSED: {f.PauseReason}");
        }
        w.AppendLine(CultureInfo.InvariantCulture, $"  waiting for their files to settle: {f.Waiting.Count} sets");
        foreach (string x in f.Waiting)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"    {x}");
        }
        foreach (var c in f.Watchers)
        {
            string last = c.LastMissed is { } m ? $", last {Age(now - m)} ago ({c.LastMissedPath})" : "";
            w.AppendLine(CultureInfo.InvariantCulture, $"  watcher {c.Root}: {c.MissedEvents} missed changes found by rescans{last}, recreated {c.Recreated} times");
        }
        if (f.RigDeviations > 0)
        {
            w.AppendLine(CultureInfo.InvariantCulture, $"  rig baseline deviations: {f.RigDeviations}");
        }
        return w.ToString();
    }

    private static string Seconds(double? s) => s is { } x ? x.ToString("0.0", CultureInfo.InvariantCulture) + " s" : "n/a";

    private static string Rate(double? r) => r is { } x ? (100 * x).ToString("0.0", CultureInfo.InvariantCulture) + "%" : "n/a";

    private static string Age(TimeSpan t) => t.TotalSeconds < 120
        ? Math.Max(0, t.TotalSeconds).ToString("0", CultureInfo.InvariantCulture) + " s"
        : t.TotalMinutes < 120 ? t.TotalMinutes.ToString("0", CultureInfo.InvariantCulture) + " min"
        : t.TotalHours.ToString("0.0", CultureInfo.InvariantCulture) + " h";
}
