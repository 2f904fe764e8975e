using System.Threading.Channels;

namespace Seamwright.Host.Supervision;

/// <summary>
/// A fixed number of worker slots. A job takes a free slot, starts a worker in it when empty,
/// runs, and gives the slot back: with its worker when the worker is still sound, empty after a
/// kill, crash or recycle (the next job starts a fresh worker). Workers are reused across jobs
/// so the per-process start cost is paid once, not per file.
/// </summary>
internal sealed class WorkerPool : IAsyncDisposable
{
    private readonly WorkerLaunch _launch;
    private readonly SupervisionOptions _options;
    private readonly IReadOnlyDictionary<string, string>? _environment;
    private readonly Channel<WorkerProcess?> _slots;
    private readonly List<WorkerProcess> _all = [];
    private long _nextId;
    private int _consecutiveStartFailures;
    private long _workersStarted;
    private long _kills;
    private long _crashes;
    private long _timeouts;
    private long _memoryKills;
    private long _jobs;
    private long _peakWorkerBytes;

    public WorkerPool(WorkerLaunch launch, SupervisionOptions options, IReadOnlyDictionary<string, string>? environment = null)
    {
        _launch = launch;
        _options = options;
        _environment = environment;
        _slots = Channel.CreateBounded<WorkerProcess?>(options.Workers);
        for (int i = 0; i < options.Workers; i++)
        {
            _slots.Writer.TryWrite(null);
        }
    }

    public WorkerPoolCounters Counters => new(
        Interlocked.Read(ref _jobs), Interlocked.Read(ref _workersStarted), Interlocked.Read(ref _kills),
        Interlocked.Read(ref _crashes), Interlocked.Read(ref _timeouts), Interlocked.Read(ref _memoryKills),
        Interlocked.Read(ref _peakWorkerBytes));

    /// <summary>The limits the most recently started worker reported (for the start-up log line).</summary>
    public string? LastWorkerLimits { get; private set; }

    /// <summary>
    /// Decodes one file in a worker. Throws <see cref="WorkerStartException"/> only when workers
    /// repeatedly fail to start (a broken installation, not a bad file: the service should stop).
    /// </summary>
    public async Task<JobResult> RunAsync(string path, CancellationToken cancellationToken, string? featureOutputPath = null, WorkerJobSpec? spec = null)
    {
        var worker = await _slots.Reader.ReadAsync(cancellationToken);
        try
        {
            if (worker is null || !worker.IsUsable)
            {
                if (worker is not null)
                {
                    await RetireAsync(worker);
                }
                worker = null;
                worker = await StartWorkerAsync(cancellationToken);
            }
            var request = new WorkerRequest(Interlocked.Increment(ref _nextId), path,
                _options.MaxFileMegabytes << 20, (long)(_options.MaxMegapixels * 1_000_000), featureOutputPath,
                spec?.Engine, spec?.FeaturesJson, spec?.LimitsJson, spec?.PreviewMaxSide ?? 0);
            Interlocked.Increment(ref _jobs);
            var result = await worker.RunAsync(request, _options, cancellationToken);
            RecordPeak(result.PeakWorkingSetBytes);
            switch (result.End)
            {
                case JobEnd.Crashed:
                    Interlocked.Increment(ref _crashes);
                    Interlocked.Increment(ref _kills);
                    break;
                case JobEnd.TimedOut:
                    Interlocked.Increment(ref _timeouts);
                    Interlocked.Increment(ref _kills);
                    break;
                case JobEnd.OverMemory:
                    Interlocked.Increment(ref _memoryKills);
                    Interlocked.Increment(ref _kills);
                    break;
            }
            if (!worker.IsUsable)
            {
                await RetireAsync(worker);
                worker = null;
            }
            return result;
        }
        catch
        {
            if (worker is not null)
            {
                await RetireAsync(worker);
                worker = null;
            }
            throw;
        }
        finally
        {
            _slots.Writer.TryWrite(worker);
        }
    }

    private async Task<WorkerProcess> StartWorkerAsync(CancellationToken cancellationToken)
    {
        try
        {
            var worker = await WorkerProcess.StartAsync(_launch, _options, _environment, cancellationToken);
            Interlocked.Exchange(ref _consecutiveStartFailures, 0);
            Interlocked.Increment(ref _workersStarted);
            LastWorkerLimits = worker.Limits;
            lock (_all)
            {
                _all.Add(worker);
            }
            return worker;
        }
        catch (WorkerStartException) when (Interlocked.Increment(ref _consecutiveStartFailures) < 3)
        {
            // One more try: a start can fail transiently (fork under memory pressure).
            return await StartWorkerAsync(cancellationToken);
        }
    }

    private async Task RetireAsync(WorkerProcess worker)
    {
        lock (_all)
        {
            _all.Remove(worker);
        }
        await worker.DisposeAsync();
    }

    private void RecordPeak(long bytes)
    {
        long seen = Interlocked.Read(ref _peakWorkerBytes);
        while (bytes > seen)
        {
            long was = Interlocked.CompareExchange(ref _peakWorkerBytes, bytes, seen);
            if (was == seen)
            {
                break;
            }
            seen = was;
        }
    }

    /// <summary>Stops every worker: stdin closed, killed after 2 s. Call on shutdown.</summary>
    public async ValueTask DisposeAsync()
    {
        _slots.Writer.TryComplete();
        WorkerProcess[] workers;
        lock (_all)
        {
            workers = [.. _all];
            _all.Clear();
        }
        foreach (var worker in workers)
        {
            await worker.DisposeAsync();
        }
    }
}

/// <summary>Pool figures for status and the periodic log line.</summary>
internal sealed record WorkerPoolCounters(long Jobs, long WorkersStarted, long Kills, long Crashes, long Timeouts, long MemoryKills, long PeakWorkerBytes);
