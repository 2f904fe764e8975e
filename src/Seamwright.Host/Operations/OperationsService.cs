using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;

namespace Seamwright.Host.Operations;

/// <summary>
/// Runs <see cref="OperationsLoop.Tick"/> on a timer: every half watchdog interval when systemd
/// asks for a watchdog (WATCHDOG_USEC), else every <see cref="OperationsOptions.HeartbeatSeconds"/>.
/// An exception in a tick is logged and marks the service unhealthy rather than ending the loop.
/// </summary>
internal sealed class OperationsService(OperationsLoop loop, HealthMonitor health, OperationsOptions options, TimeProvider time, ILogger<OperationsService> logger)
    : BackgroundService
{
    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        var period = SystemdNotifier.WatchdogPeriodFromEnvironment() is { } watchdog && watchdog < TimeSpan.FromSeconds(options.HeartbeatSeconds)
            ? watchdog
            : TimeSpan.FromSeconds(options.HeartbeatSeconds);
        health.Register(OperationsLoop.LoopName, period * 3);
        using var timer = new PeriodicTimer(period, time);
        do
        {
            try
            {
                loop.Tick();
            }
            catch (Exception ex) when (ex is not OperationCanceledException)
            {
                logger.LogError(ex, "Operations tick failed");
            }
        }
        while (await timer.WaitForNextTickAsync(stoppingToken).ConfigureAwait(false));
    }
}
