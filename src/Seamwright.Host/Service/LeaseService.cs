using System.Data.Common;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;

namespace Seamwright.Host.Service;

/// <summary>
/// The node's heartbeat in a shared ledger: every third of a lease it records the node's beat and
/// renews the leases of the sets it holds. While the ledger cannot be reached, intake pauses
/// (<see cref="ServiceRuntime.LedgerDown"/>) and, once a whole lease has passed without a beat,
/// the health monitor reports the service unhealthy; the node stays up and resumes when the
/// ledger answers again. Inert with the SQLite ledger.
/// </summary>
internal sealed partial class LeaseService(ServiceRuntime runtime, ILogger<LeaseService> log) : BackgroundService
{
    public const string LoopName = "ledger";

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        var shared = runtime.Roots.Select(r => r.Context).Where(c => c.Store.IsShared).ToList();
        if (shared.Count == 0)
        {
            return;
        }
        long lease = shared.Min(c => c.LeaseMilliseconds);
        var period = TimeSpan.FromMilliseconds(Math.Max(200, lease / 3));
        runtime.Ops?.Health.Register(LoopName, TimeSpan.FromMilliseconds(lease));
        bool down = false;
        while (!stoppingToken.IsCancellationRequested)
        {
            try
            {
                foreach (var c in shared)
                {
                    c.Store.Beat(c.NodeName, Environment.ProcessId, c.LeaseMilliseconds);
                }
                runtime.Ops?.Health.Beat(LoopName);
                runtime.LedgerDown = false;
                if (down)
                {
                    LogBack(log);
                    down = false;
                }
            }
            catch (DbException e)
            {
                runtime.LedgerDown = true;
                runtime.Ops?.Health.CannotBeat(LoopName, "the shared ledger is unreachable: " + e.Message);
                if (!down)
                {
                    LogDown(log, e.Message);
                    down = true;
                }
            }
            try
            {
                await Task.Delay(period, stoppingToken).ConfigureAwait(false);
            }
            catch (OperationCanceledException)
            {
                return;
            }
        }
    }

    [LoggerMessage(Level = LogLevel.Error, Message = "The shared ledger is unreachable; intake paused, sets in progress will not be published until it answers: {Reason}")]
    private static partial void LogDown(ILogger logger, string reason);

    [LoggerMessage(Level = LogLevel.Information, Message = "The shared ledger answers again; intake resumed")]
    private static partial void LogBack(ILogger logger);
}
