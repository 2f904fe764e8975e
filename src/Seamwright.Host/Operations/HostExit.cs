using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;

namespace Seamwright.Host.Operations;

/// <summary>
/// The exit code after the host stopped. An exception escaping a BackgroundService stops the host
/// but leaves the process to exit 0, which a service manager reads as a clean stop and does not
/// restart (dotnet/runtime#68165, #77381; RELIABILITY.md). So a faulted loop, or a fatal error a
/// loop reported, means exit 1.
/// </summary>
internal static class HostExit
{
    public static int CodeFor(IHost host, Exception? reportedFatal = null)
    {
        if (reportedFatal is not null)
        {
            return ExitCodes.Fatal;
        }
        foreach (var service in host.Services.GetServices<IHostedService>().OfType<BackgroundService>())
        {
            if (service.ExecuteTask is { IsFaulted: true })
            {
                return ExitCodes.Fatal;
            }
        }
        return ExitCodes.Ok;
    }

    /// <summary>The first faulted loop's exception, for the fatal log line; null when none.</summary>
    public static Exception? FirstFault(IHost host) =>
        host.Services.GetServices<IHostedService>().OfType<BackgroundService>()
            .Select(s => s.ExecuteTask?.Exception?.GetBaseException())
            .FirstOrDefault(e => e is not null);
}
