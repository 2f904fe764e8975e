using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;

namespace Seamwright.Host.Service;

/// <summary>
/// The one loop that owns set state: drains watcher hints, runs requested rescans, looks again
/// at files still in the stability gate, applies settings reloads and worker results, and hands
/// complete sets to the workers through a bounded channel.
/// </summary>
internal sealed partial class SchedulerService(ServiceRuntime runtime, IHostApplicationLifetime lifetime, ILogger<SchedulerService> log) : BackgroundService
{
    private readonly Dictionary<(int Root, string Set), SetJob> _busy = [];

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        try
        {
            await Task.Yield();
            var trackers = runtime.Roots.Select((s, i) => new RootTracker(i, s)).ToList();
            foreach (var t in trackers)
            {
                t.Start(DateTime.UtcNow, runtime.Options.Service.StableSeconds);
                LogStarted(log, t.Session.Catalog.RootPath, t.Sets.Count, t.Sets.Values.Count(s => s.Phase == SetPhase.Done));
            }
            var pending = new Queue<SetJob>();
            while (!stoppingToken.IsCancellationRequested)
            {
                var now = DateTime.UtcNow;
                var opts = runtime.Options.Service;
                bool rescan = runtime.TakeRescanRequest();
                while (runtime.Hints.Reader.TryRead(out var hint))
                {
                    if (hint.Path is null || !trackers[hint.Root].ApplyHint(hint.Path, now))
                    {
                        rescan = true;
                    }
                }
                if (rescan)
                {
                    foreach (var t in trackers)
                    {
                        t.Rescan(now);
                    }
                }
                if (runtime.SettingsChanged)
                {
                    runtime.SettingsChanged = false;
                    foreach (var t in trackers)
                    {
                        int n = t.ApplySettingsChange(now);
                        LogSettingsChanged(log, t.Session.Catalog.RootPath, n);
                    }
                }
                while (runtime.Results.Reader.TryRead(out var result))
                {
                    var key = (result.Root, result.Outcome.SetId);
                    if (_busy.Remove(key, out var job))
                    {
                        trackers[result.Root].Finished(job, result.Outcome, now);
                    }
                }
                foreach (var t in trackers)
                {
                    t.Relook(now, opts.StableSeconds);
                    if (pending.Count == 0)
                    {
                        foreach (var job in t.Ready(now, opts.StableSeconds))
                        {
                            t.Queued(job.Set.SetId);
                            _busy[(job.Root, job.Set.SetId)] = job;
                            pending.Enqueue(job);
                            LogReady(log, job.Set.SetId, job.Set.Files.Count, job.Incomplete);
                        }
                    }
                }
                while (pending.Count > 0 && runtime.Jobs.Writer.TryWrite(pending.Peek()))
                {
                    var sent = pending.Dequeue();
                    trackers[sent.Root].Sets[sent.Set.SetId].Phase = SetPhase.Running;
                }
                using var tick = CancellationTokenSource.CreateLinkedTokenSource(stoppingToken);
                tick.CancelAfter(opts.PollMilliseconds);
                try
                {
                    await runtime.Results.Reader.WaitToReadAsync(tick.Token).ConfigureAwait(false);
                }
                catch (OperationCanceledException) when (!stoppingToken.IsCancellationRequested)
                {
                }
            }
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
        finally
        {
            runtime.Jobs.Writer.TryComplete();
        }
    }

    [LoggerMessage(Level = LogLevel.Information, Message = "Root {Root}: {Sets} sets found at start, {Done} already up to date")]
    private static partial void LogStarted(ILogger logger, string root, int sets, int done);

    [LoggerMessage(Level = LogLevel.Information, Message = "Set {Set} is ready with {Files} images (incomplete: {Incomplete})")]
    private static partial void LogReady(ILogger logger, string set, int files, bool incomplete);

    [LoggerMessage(Level = LogLevel.Information, Message = "Settings reloaded: {Count} sets of {Root} are stale and will be redone")]
    private static partial void LogSettingsChanged(ILogger logger, string root, int count);

    [LoggerMessage(Level = LogLevel.Critical, Message = "The scheduler loop failed")]
    private static partial void LogFatal(ILogger logger, Exception error);
}
