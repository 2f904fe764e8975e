namespace Seamwright.Host;

/// <summary>Process exit codes; documented in README.md.</summary>
internal static class ExitCodes
{
    public const int Ok = 0;
    public const int Fatal = 1;
    public const int BadArguments = 2;
    public const int FinishedWithProblems = 3;

    /// <summary>`status`: no service running for that output root (stopped cleanly, or never started).</summary>
    public const int ServiceNotRunning = 4;

    /// <summary>`status`: a service is running but unhealthy or not responding.</summary>
    public const int ServiceUnhealthy = 5;
}
