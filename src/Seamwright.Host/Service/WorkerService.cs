using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Seamwright.Pipeline.Processing;

namespace Seamwright.Host.Service;

/// <summary>
/// Takes complete sets from the bounded job channel, processes up to MaxParallelSets at once,
/// and reports each outcome back to the scheduler. A set's failure is recorded and never stops
/// the service; only a failure of the loop itself does (and the process then exits non-zero).
/// </summary>
internal sealed partial class WorkerService(ServiceRuntime runtime, IHostApplicationLifetime lifetime, ILogger<WorkerService> log) : BackgroundService
{
    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        try
        {
            int n = runtime.Options.Service.MaxParallelSets;
            var loops = Enumerable.Range(0, n).Select(_ => Task.Run(() => Loop(stoppingToken), stoppingToken)).ToArray();
            await Task.WhenAll(loops).ConfigureAwait(false);
        }
        catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
        {
        }
        catch (Exception e)
        {
            LogFatal(log, e);
            runtime.SetFatal(e);
            lifetime.StopApplication();
        }
    }

    private async Task Loop(CancellationToken stop)
    {
        await foreach (var job in runtime.Jobs.Reader.ReadAllAsync(stop).ConfigureAwait(false))
        {
            // The run resolves its plan from the context's current settings when it begins;
            // a reload meanwhile only affects runs that begin after it.
            var ctx = runtime.Roots[job.Root].Context;
            SetOutcome outcome;
            try
            {
                outcome = new SetProcessor(ctx).Process(job.Set, job.Incomplete, stop);
            }
            catch (OperationCanceledException) when (stop.IsCancellationRequested)
            {
                return; // the run was recorded as abandoned; the set is redone after restart
            }
            runtime.Handoff?.After(outcome, RootSettingsOf(job.Root), ctx.OutputRoot);
            await runtime.Results.Writer.WriteAsync(new SetJobResult(job.Root, outcome), stop).ConfigureAwait(false);
        }
    }

    /// <summary>The root's settings now in force (a reload may have changed its hand-off), else those it was opened with.</summary>
    private Pipeline.Settings.RootSettings RootSettingsOf(int root)
    {
        var opened = runtime.Roots[root].Root;
        var current = runtime.Options.Roots.ElementAtOrDefault(root);
        return current is not null && Path.GetFullPath(current.Path) == Path.GetFullPath(opened.Path) ? current : opened;
    }

    [LoggerMessage(Level = LogLevel.Critical, Message = "The worker loop failed")]
    private static partial void LogFatal(ILogger logger, Exception error);
}
