using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;

namespace Seamwright.Host.Operations;

/// <summary>
/// The exit code after the host stopped. An exception escaping a BackgroundService stops the host
/// but leaves the process to exit 0, which a service manager reads as a clean stop and does not
/// restart (dotnet/runtime#68165, #77381; docs/RELIABILITY.md). So a faulted loop, or a fatal error a
/// loop reported, means exit 1.
/// </summary>
internal static class HostExit
{
    /// <summary>The host's loops; take them before running the host (running disposes its services).</summary>
    public static IReadOnlyList<BackgroundService> LoopsOf(IHost host) =>
        host.Services.GetServices<IHostedService>().OfType<BackgroundService>().ToList();

    public static int CodeFor(IReadOnlyList<BackgroundService> loops, Exception? reportedFatal = null) =>
        reportedFatal is not null || loops.Any(l => l.ExecuteTask is { IsFaulted: true }) ? ExitCodes.Fatal : ExitCodes.Ok;

    /// <summary>The first faulted loop's exception, for the fatal log line; null when none.</summary>
    public static Exception? FirstFault(IReadOnlyList<BackgroundService> loops) =>
        loops.Select(s => s.ExecuteTask?.Exception?.GetBaseException()).FirstOrDefault(e => e is not null);
}
