namespace Seamwright.Host.Operations;

/// <summary>
/// Settings of the health and housekeeping loop (section "Operations" of appsettings.json).
/// Defaults are common practice, not measured optima.
/// </summary>
internal sealed record OperationsOptions
{
    /// <summary>Seconds between health checks, heartbeat file updates and watchdog pings when systemd sets no watchdog (1..300). Default 10.</summary>
    public double HeartbeatSeconds { get; init; } = 10;

    /// <summary>Seconds between the structured figures log lines (10..86400). Default 300.</summary>
    public double FiguresLogSeconds { get; init; } = 300;

    /// <summary>
    /// Address and port of the monitoring endpoint (GET /metrics, GET /health), for example
    /// <c>127.0.0.1:9464</c>; empty (the default) keeps it off.
    /// </summary>
    public string HttpListen { get; init; } = "";

    /// <summary>Intake pauses when an output volume has less free space than this, MiB (0 = never). Default 1024.</summary>
    public long PauseBelowFreeMegabytes { get; init; } = 1024;

    /// <summary>Intake resumes at the threshold plus this margin, MiB. Default 512.</summary>
    public long ResumeMarginMegabytes { get; init; } = 512;

    /// <summary>Log files older than this are deleted, days (0 = keep). Default 30.</summary>
    public int LogRetentionDays { get; init; } = 30;

    /// <summary>Confidence-log records older than this are dropped, days (0 = keep). Default 365.</summary>
    public int ConfidenceLogRetentionDays { get; init; } = 365;

    /// <summary>Feature cache entries not used for this long are deleted, days (0 = keep). Default 60.</summary>
    public int FeatureCacheRetentionDays { get; init; } = 60;

    /// <summary>Runs kept per set besides the newest; older runs' files are removed by the service (0..1000). Default 3.</summary>
    public int KeepOldRuns { get; init; } = 3;

    /// <summary>Hours between retention sweeps (1..168). Default 24.</summary>
    public double RetentionSweepHours { get; init; } = 24;

    public IReadOnlyList<string> Validate()
    {
        var problems = new List<string>();
        Check(HeartbeatSeconds is >= 1 and <= 300, "Operations:HeartbeatSeconds must be 1..300");
        Check(FiguresLogSeconds is >= 10 and <= 86400, "Operations:FiguresLogSeconds must be 10..86400");
        if (HttpListen.Length > 0 && HttpEndpoint.Parse(HttpListen, out string? listenProblem) is null)
        {
            problems.Add("Operations:HttpListen " + listenProblem + "; empty turns the endpoint off");
        }
        Check(PauseBelowFreeMegabytes >= 0, "Operations:PauseBelowFreeMegabytes must be 0 or more");
        Check(ResumeMarginMegabytes >= 0, "Operations:ResumeMarginMegabytes must be 0 or more");
        Check(LogRetentionDays >= 0 && ConfidenceLogRetentionDays >= 0 && FeatureCacheRetentionDays >= 0,
            "Operations:*RetentionDays must be 0 (keep) or more");
        Check(KeepOldRuns is >= 0 and <= 1000, "Operations:KeepOldRuns must be 0..1000");
        Check(RetentionSweepHours is >= 1 and <= 168, "Operations:RetentionSweepHours must be 1..168");
        return problems;

        void Check(bool ok, string message)
        {
            if (!ok)
            {
                problems.Add(message);
            }
        }
    }
}
