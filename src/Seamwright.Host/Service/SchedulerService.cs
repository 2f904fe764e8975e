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
                var retired = t.Start(runtime.Time.GetUtcNow().UtcDateTime, runtime.Options.Service.StableSeconds);
                LogStarted(log, t.Session.Catalog.RootPath, t.Sets.Count, t.Sets.Values.Count(s => s.Phase == SetPhase.Done));
                Retired(t, retired, runtime.Ops);
            }
            var pending = new Queue<SetJob>();
            var ops = runtime.Ops;
            ops?.Health.Register(LoopName, TimeSpan.FromMilliseconds(Math.Max(60_000, 20 * runtime.Options.Service.PollMilliseconds)));
            int round = 0;
            while (!stoppingToken.IsCancellationRequested)
            {
                var now = runtime.Time.GetUtcNow().UtcDateTime;
                var opts = runtime.Options.Service;
                ops?.Health.Beat(LoopName);
                try
                {
                    Rescan(trackers, now, ops);
                    RecreateSilentWatchers(trackers);
                    ApplySettingsChange(trackers, now);
                    TakeResults(trackers, now, ops);
                    Schedule(trackers, pending, now, opts, ops);
                    Publish(trackers, pending, now, opts, ops, round++);
                }
                catch (System.Data.Common.DbException e) when (runtime.Roots.Any(r => r.Context.Store.IsShared))
                {
                    // The shared ledger is unreachable: nothing new is taken; the next round (or rescan) catches up.
                    runtime.LedgerDown = true;
                    LogLedgerUnreachable(log, e.Message);
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

    /// <summary>Applies the watcher's hints; a rescan when asked for or when a hint cannot be applied on its own.</summary>
    private void Rescan(List<RootTracker> trackers, DateTime now, ServiceOperations? ops)
    {
        var rescan = runtime.TakeRescanRequest();
        while (runtime.Hints.Reader.TryRead(out var hint))
        {
            if (hint.Path is null || !trackers[hint.Root].ApplyHint(hint.Path, now))
            {
                rescan = RescanKind.Requested;
            }
        }
        if (rescan != RescanKind.None)
        {
            foreach (var t in trackers)
            {
                var found = t.Rescan(now);
                if (rescan == RescanKind.Periodic)
                {
                    found.ForEach(p => ops?.Missed?.Suspect(t.Index, p));
                }
            }
        }
        foreach (var t in trackers)
        {
            Retired(t, t.RetireEmptied(now, runtime.Options.Service.StableSeconds), ops);
        }
    }

    private void Retired(RootTracker t, List<string> sets, ServiceOperations? ops)
    {
        foreach (var set in sets)
        {
            ops?.Metrics.RecordSet(Pipeline.State.SetStates.Retired);
            LogRetired(log, set, t.Session.Catalog.RootPath);
        }
    }

    private void ApplySettingsChange(List<RootTracker> trackers, DateTime now)
    {
        if (!runtime.SettingsChanged)
        {
            return;
        }
        runtime.SettingsChanged = false;
        foreach (var t in trackers)
        {
            int n = t.ApplySettingsChange(now);
            LogSettingsChanged(log, t.Session.Catalog.RootPath, n);
        }
    }

    private void TakeResults(List<RootTracker> trackers, DateTime now, ServiceOperations? ops)
    {
        while (runtime.Results.Reader.TryRead(out var result))
        {
            var key = (result.Root, result.Outcome.SetId);
            if (_busy.Remove(key, out var job))
            {
                if (ops is not null && result.Outcome.Kind == Pipeline.Processing.SetOutcomeKind.Done
                    && trackers[result.Root].Sets.TryGetValue(result.Outcome.SetId, out var finished))
                {
                    ops.Metrics.RecordSetOutput(new DateTimeOffset(finished.TriggerUtc, TimeSpan.Zero), new DateTimeOffset(now, TimeSpan.Zero));
                }
                trackers[result.Root].Finished(job, result.Outcome, now);
            }
        }
    }

    /// <summary>Takes the sets that became ready (none while intake is paused) and hands the queue to the workers.</summary>
    private void Schedule(List<RootTracker> trackers, Queue<SetJob> pending, DateTime now, Pipeline.Settings.ServiceSettings opts, ServiceOperations? ops)
    {
        foreach (var t in trackers)
        {
            t.Relook(now, opts.StableSeconds);
            // Below the free-space threshold no new set is taken; sets in progress finish.
            if (pending.Count == 0 && ops?.Disk?.Paused != true && !runtime.LedgerDown)
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
            trackers[sent.Root].Running(sent.Set.SetId);
        }
    }

    private void Publish(List<RootTracker> trackers, Queue<SetJob> pending, DateTime now, Pipeline.Settings.ServiceSettings opts, ServiceOperations? ops, int round)
    {
        if (ops is not null)
        {
            ops.QueueDepth = pending.Count + runtime.Jobs.Reader.Count;
            ops.PublishWaiting(WaitingSets(trackers, now, opts.StableSeconds));
            if (round % 20 == 0)
            {
                ops.PublishStuck(StuckSets(trackers, now));
            }
        }
    }

    private const string LoopName = "scheduler";

    /// <summary>Changes a periodic rescan found that the watcher never reported: that watcher went silent, recreate it.</summary>
    private void RecreateSilentWatchers(List<RootTracker> trackers)
    {
        foreach (var (root, missed, example) in runtime.Ops?.Missed?.Due() ?? [])
        {
            LogMissed(log, trackers[root].Session.Catalog.RootPath, missed, example);
            runtime.RestartWatcher?.Invoke(root);
        }
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "The watcher of {Root} missed {Count} changes that a periodic rescan found (for example {Path}); recreating it")]
    private static partial void LogMissed(ILogger logger, string root, int count, string path);

    /// <summary>Sets still waiting a minute past their profile's maximum wait (the completion rule should have released them).</summary>
    private static List<string> StuckSets(List<RootTracker> trackers, DateTime now)
    {
        var stuck = new List<string>();
        foreach (var t in trackers)
        {
            foreach (var set in t.Sets.Values.Where(s => s.Phase is SetPhase.Waiting or SetPhase.Queued))
            {
                double maxWait = t.Session.Context.Options.Profile(t.Session.Catalog.ProfileFor(set.Id)).Completion.MaxWaitSeconds;
                var waited = now - set.FirstSeenUtc;
                if (waited.TotalSeconds > maxWait + 60)
                {
                    stuck.Add(System.FormattableString.Invariant($"{set.Id}: {set.Phase.ToString().ToLowerInvariant()} for {waited.TotalMinutes:0} min (maximum wait {maxWait / 60:0} min; {set.LastWhy})"));
                }
            }
        }
        return stuck;
    }

    /// <summary>At most this many waiting sets are listed; the rest are counted.</summary>
    private const int WaitingListed = 50;

    /// <summary>Sets waiting for their files to settle or for their completion rule, with how many files are still settling.</summary>
    internal static List<string> WaitingSets(IEnumerable<RootTracker> trackers, DateTime now, double stableSeconds)
    {
        var waiting = trackers.SelectMany(t => t.Sets.Values).Where(s => s.Phase == SetPhase.Waiting && s.Files.Count > 0)
            .OrderBy(s => s.FirstSeenUtc).ThenBy(s => s.Id, StringComparer.Ordinal).ToList();
        var list = waiting.Take(WaitingListed).Select(s =>
        {
            int settling = s.Files.Values.Count(f => (now - f.StableSinceUtc).TotalSeconds < stableSeconds);
            string why = s.LastWhy.Length > 0 ? "; " + s.LastWhy : "";
            return System.FormattableString.Invariant($"{s.Id}: {s.Files.Count} files, {settling} still within the {stableSeconds:0.#} s quiet period{why}");
        }).ToList();
        if (waiting.Count > WaitingListed)
        {
            list.Add(System.FormattableString.Invariant($"... and {waiting.Count - WaitingListed} more sets"));
        }
        return list;
    }

    [LoggerMessage(Level = LogLevel.Information, Message = "Root {Root}: {Sets} sets found at start, {Done} already up to date")]
    private static partial void LogStarted(ILogger logger, string root, int sets, int done);

    [LoggerMessage(Level = LogLevel.Information, Message = "Set {Set} of {Root} retired: its folder was removed, so its outputs were removed")]
    private static partial void LogRetired(ILogger logger, string set, string root);

    [LoggerMessage(Level = LogLevel.Information, Message = "Set {Set} is ready with {Files} images (incomplete: {Incomplete})")]
    private static partial void LogReady(ILogger logger, string set, int files, bool incomplete);

    [LoggerMessage(Level = LogLevel.Information, Message = "Settings reloaded: {Count} sets of {Root} are stale and will be redone")]
    private static partial void LogSettingsChanged(ILogger logger, string root, int count);

    [LoggerMessage(Level = LogLevel.Warning, Message = "The shared ledger is unreachable; intake paused: {Reason}")]
    private static partial void LogLedgerUnreachable(ILogger logger, string reason);

    [LoggerMessage(Level = LogLevel.Critical, Message = "The scheduler loop failed")]
    private static partial void LogFatal(ILogger logger, Exception error);
}
