namespace Seamwright.Host.Operations;

/// <summary>
/// What the heartbeat file says about the service of one output root, judged at a moment:
/// <c>running</c> (fresh heartbeat), <c>stopped</c> (a clean stop recorded, or the process that
/// wrote the last heartbeat is gone), <c>not-responding</c> (the heartbeat is older than three beats
/// and its process is still there, or cannot be checked from this machine) or
/// <c>not-started</c> (no heartbeat file). Pure: the process check is passed in.
/// </summary>
internal static class ServiceState
{
    public const string Running = "running";
    public const string Stopped = "stopped";
    public const string NotResponding = "not-responding";
    public const string NotStarted = "not-started";

    /// <summary>The state and a note in words (why, when it is not plain).</summary>
    public static (string State, string? Note) Judge(OperationsFigures? f, DateTimeOffset now, TimeSpan staleAfter, Func<OperationsFigures, bool?> processAlive)
    {
        ArgumentNullException.ThrowIfNull(processAlive);
        if (f is null)
        {
            return (NotStarted, "no heartbeat file: the service has not run for this output root (or cannot write its state folder)");
        }
        if (f.State == Stopped)
        {
            return (Stopped, "stopped cleanly");
        }
        if (now - f.At <= staleAfter)
        {
            return (Running, f.Healthy ? null : "unhealthy");
        }
        return processAlive(f) == false
            ? (Stopped, "the process that wrote the last heartbeat is gone without a clean stop (killed or crashed)")
            : (NotResponding, "heartbeat older than three beats; the last known figures follow");
    }

    /// <summary>Exit code of `status` for one root: 0 running and healthy, 4 no service, 5 unhealthy or not responding.</summary>
    public static int ExitCode(string state, bool healthy) => state switch
    {
        Running => healthy ? ExitCodes.Ok : ExitCodes.ServiceUnhealthy,
        NotResponding => ExitCodes.ServiceUnhealthy,
        _ => ExitCodes.ServiceNotRunning,
    };

    /// <summary>Whether the heartbeat's process still exists on this machine; null when it ran on another machine.</summary>
    public static bool? ProcessAlive(OperationsFigures f)
    {
        ArgumentNullException.ThrowIfNull(f);
        if (f.Machine is { Length: > 0 } m && !string.Equals(m, Environment.MachineName, StringComparison.OrdinalIgnoreCase))
        {
            return null;
        }
        try
        {
            using var p = System.Diagnostics.Process.GetProcessById(f.ProcessId);
            return !p.HasExited;
        }
        catch (ArgumentException)
        {
            return false;
        }
        catch (InvalidOperationException)
        {
            return false;
        }
    }
}
