using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Logging;
using Seamwright.Host.Configuration;
using Seamwright.Host.Operations;
using Seamwright.Host.Supervision;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Quarantine;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Host.Service;

/// <summary>
/// What `watch` adds for unattended operation: supervised decoding (a worker pool shared by all
/// roots, a quarantine ledger per output root) and the health and housekeeping loop (heartbeat,
/// watchdog, missed-event detection, disk-space intake gate, figures, retention). Settings: the sections
/// Seamwright:Supervision and Seamwright:Operations.
/// </summary>
internal sealed class ServiceOperations : IServiceFigureSource, IAsyncDisposable
{
    public const string ScratchFolder = "worker-scratch";
    public const string LedgerFile = "decode-attempts.db";

    private readonly List<IQuarantineLedger> _ledgers = [];
    private readonly Dictionary<IQuarantineLedger, IReadOnlyList<string>> _lastQuarantined = [];

    public ServiceOperations(IConfiguration configuration, TimeProvider time)
    {
        try
        {
            Supervision = configuration.GetSection("Seamwright:Supervision").Get<SupervisionOptions>() ?? new SupervisionOptions();
            Options = configuration.GetSection("Seamwright:Operations").Get<OperationsOptions>() ?? new OperationsOptions();
        }
        catch (InvalidOperationException e)
        {
            throw new SettingsException("A setting has a value of the wrong type: " + e.Message + " (allowed values: config/README.md)", e);
        }
        var problems = Supervision.Validate().Concat(Options.Validate()).ToList();
        if (problems.Count > 0)
        {
            throw new SettingsException(string.Join("; ", problems));
        }
        Time = time;
        Health = new HealthMonitor(time);
        Metrics = new OperationsMetrics();
        Pool = Supervision.Enabled ? new WorkerPool(WorkerLaunch.ForCurrentProgram(), Supervision, WorkerTestFaults.PassThrough()) : null;
    }

    public SupervisionOptions Supervision { get; }

    public OperationsOptions Options { get; }

    public TimeProvider Time { get; }

    public HealthMonitor Health { get; }

    public OperationsMetrics Metrics { get; }

    public WorkerPool? Pool { get; }

    public DiskSpaceGuard? Disk { get; private set; }

    /// <summary>The health loop once the host built it (its last figures feed the gauges and /health).</summary>
    public OperationsLoop? Loop { get; private set; }

    /// <summary>The service's System.Diagnostics.Metrics instruments (exported by the HTTP endpoint when on).</summary>
    public ServiceMeters? Meters { get; private set; }

    /// <summary>The nodes of each root's ledger as the health loop last read them (the metrics read these).</summary>
    public NodeBoard? Nodes { get; private set; }

    /// <summary>Changes found by periodic rescans that no watcher event reported (per root, by index).</summary>
    public MissedEventDetector? Missed { get; private set; }

    /// <summary>Published by the scheduler each round.</summary>
    public int QueueDepth { get; set; }

    private IReadOnlyList<string> _stuck = [];

    public void PublishStuck(IReadOnlyList<string> stuck) => Volatile.Write(ref _stuck, stuck);

    public IReadOnlyList<string> StuckSets() => Volatile.Read(ref _stuck);

    private IReadOnlyList<string> _waiting = [];

    public void PublishWaiting(IReadOnlyList<string> waiting) => Volatile.Write(ref _waiting, waiting);

    public IReadOnlyList<string> Waiting() => Volatile.Read(ref _waiting);

    public IReadOnlyList<string> Quarantined()
    {
        lock (_ledgers)
        {
            var all = new List<string>();
            foreach (var ledger in _ledgers)
            {
                try
                {
                    _lastQuarantined[ledger] = [.. ledger.ListQuarantined().Select(q => $"{q.File.Path}: {q.Reason}")];
                }
                catch (System.Data.Common.DbException)
                {
                    // The shared ledger is unreachable (health says so): the last list read stands.
                }
                all.AddRange(_lastQuarantined.GetValueOrDefault(ledger, []));
            }
            return all;
        }
    }

    /// <summary>The engine a root uses: analysis in supervised workers (when enabled) with this root's quarantine ledger.</summary>
    public IPairEngine EngineFor(RootSettings root, SeamwrightOptions options, IPairEngine engine, ILogger logger)
    {
        ArgumentNullException.ThrowIfNull(root);
        ArgumentNullException.ThrowIfNull(options);
        if (Pool is null)
        {
            return engine;
        }
        string state = Path.Combine(root.EffectiveOutput, StateStore.StateFolder);
        Directory.CreateDirectory(state);
        // SQLite beside the state, or the shared PostgreSQL table: a file that killed a worker on one node is not tried on the next.
        var ledger = QuarantineLedgers.Open(root.EffectiveOutput, root.Path, options.State, options.Service.EffectiveNodeName, LedgerFile);
        lock (_ledgers)
        {
            _ledgers.Add(ledger);
        }
        var supervisor = new DecodeSupervisor(Pool, ledger, Supervision, Time, logger);
        supervisor.RecoverInterrupted();
        // Analyses handed over by workers are read and deleted at once; what a killed service left
        // is stale. Only old files go: the output root's lock is not taken yet, and another
        // instance holding it may have a file in flight.
        string scratch = Path.Combine(state, ScratchFolder);
        if (Directory.Exists(scratch))
        {
            foreach (var stale in new DirectoryInfo(scratch).GetFiles().Where(f => f.LastWriteTimeUtc < Time.GetUtcNow().UtcDateTime.AddHours(-1)))
            {
                stale.Delete();
            }
        }
        return new SupervisedEngine(engine, supervisor, scratch);
    }

    /// <summary>Registers the operations loop once the roots are open.</summary>
    public void AddTo(IServiceCollection services, IReadOnlyList<string> watchedRoots, IReadOnlyList<ProcessingContext> roots, string? logFolder)
    {
        ArgumentNullException.ThrowIfNull(roots);
        var outputRoots = roots.Select(r => r.OutputRoot).ToList();
        if (Options.PauseBelowFreeMegabytes > 0)
        {
            Disk = new DiskSpaceGuard(new DriveFreeSpaceProbe(), outputRoots, Options.PauseBelowFreeMegabytes << 20, Options.ResumeMarginMegabytes << 20);
        }
        Nodes = new NodeBoard(roots, Time);
        Missed = new MissedEventDetector(watchedRoots, Time, TimeSpan.FromSeconds(MissedEventDetector.DefaultGraceSeconds));
        var heartbeats = outputRoots.Select(o => Path.Combine(o, StateStore.StateFolder, HeartbeatFile.FileName)).ToList();
        var caches = outputRoots.Select(o => Path.Combine(o, StateStore.StateFolder, "features")).ToList();
        var runs = new LedgerRunRetention(roots);
        var retention = new RetentionSweeper(Options, logFolder, caches, runs.ConfidenceLogs, runs);
        services.AddSingleton(this);
        services.AddSingleton(Health);
        services.AddSingleton(Options);
        services.AddSingleton(Time);
        services.AddSingleton(sp => Loop = new OperationsLoop(Options, Health, Metrics, this, Time,
            sp.GetRequiredService<ILoggerFactory>().CreateLogger<OperationsLoop>(), heartbeats,
            SystemdNotifier.FromEnvironment(), Disk, Missed, Pool, retention, Nodes));
        services.AddHostedService<OperationsService>();
        AddMeters(services, outputRoots);
    }

    /// <summary>The instruments, and the HTTP endpoint exporting them when Operations:HttpListen is set.</summary>
    private void AddMeters(IServiceCollection services, IReadOnlyList<string> outputRoots)
    {
        var probe = new DriveFreeSpaceProbe();
        Meters = new ServiceMeters(new ServiceGaugeSource
        {
            QueueDepth = () => QueueDepth,
            Last = () => Loop?.Last,
            WorkerKills = () => Pool?.Counters.Kills ?? 0,
            FreeDisk = () => outputRoots.Select(o => (o, probe.FreeBytes(o))),
            MissedChanges = () => Missed?.States().Select(s => (s.Root, s.MissedEvents)) ?? [],
            Nodes = () => Nodes?.Nodes() ?? [],
            NodesReadAt = () => Nodes?.ReadUtc() ?? [],
        });
        Metrics.Meters = Meters;
        if (HttpEndpoint.Parse(Options.HttpListen, out _) is { } listen)
        {
            HttpEndpoint.ConfigureExport();
            services.AddHostedService(sp => new HttpEndpoint(listen, Health, () => Loop?.Last, sp.GetRequiredService<ILogger<HttpEndpoint>>()));
        }
    }

    public async ValueTask DisposeAsync()
    {
        if (Pool is not null)
        {
            await Pool.DisposeAsync();
        }
        Meters?.Dispose();
        lock (_ledgers)
        {
            _ledgers.ForEach(l => (l as IDisposable)?.Dispose());
            _ledgers.Clear();
        }
    }
}
