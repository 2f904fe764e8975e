using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// An opened output root: its lock (one instance per output root), leftover temporary files swept,
/// the ledger opened and runs interrupted by a crash recovered, the confidence log with any torn
/// last line dropped, and the set catalog of the watched root it serves.
/// </summary>
public sealed class RootSession : IDisposable
{
    private readonly OutputRootLock? _lock;

    private RootSession(OutputRootLock? rootLock, ProcessingContext context, SetCatalog catalog)
    {
        _lock = rootLock;
        Context = context;
        Catalog = catalog;
    }

    public ProcessingContext Context { get; }

    public SetCatalog Catalog { get; }

    public RootSettings Root { get; private set; } = new();

    public int SweptTemporaries { get; private set; }

    public IReadOnlyList<string> RecoveredSets { get; private set; } = [];

    public bool OutputOnNetworkShare { get; private set; }

    /// <summary>
    /// The output root recorded serving this same watched root before this session opened it. Only
    /// then do ledger sets missing from the root mean removed set folders (<see cref="SetRetirement"/>),
    /// rather than sets of another root that shared the output root.
    /// </summary>
    public bool ServedThisRootBefore { get; private set; }

    public static RootSession Open(RootSettings root, SeamwrightOptions options, IPairEngine engine, MemoryBudget budget,
        SemaphoreSlim jobSlots, IProcessingObserver observer)
    {
        ArgumentNullException.ThrowIfNull(root);
        if (!Directory.Exists(root.Path))
        {
            throw new DirectoryNotFoundException("The folder to watch does not exist: " + root.Path);
        }
        string output = root.EffectiveOutput;
        Directory.CreateDirectory(output);
        // With a shared ledger several nodes serve one output root (claims keep them apart); the
        // single-process lock applies to the SQLite ledger only.
        bool shared = StateProviders.IsPostgreSql(options.State.Provider);
        string node = options.Service.EffectiveNodeName;
        var rootLock = shared ? null : OutputRootLock.Acquire(output);
        try
        {
            int swept = shared ? AtomicFile.SweepTemporaries(output, AtomicFile.WriterTagFor(node)) : AtomicFile.SweepTemporaries(output);
            string? before = WatchedRootRecord.Read(output);
            WatchedRootRecord.Write(output, root.Path);
            var store = StateStore.Open(output, options.State);
            var recovered = store.RecoverInterrupted(node);
            if (shared)
            {
                store.RegisterNode(node, Environment.ProcessId);
            }
            var ctx = new ProcessingContext
            {
                NodeName = node,
                LeaseMilliseconds = options.State.LeaseMilliseconds,
                OutputRoot = output,
                Options = options,
                Store = store,
                Log = new ConfidenceLog(output),
                Engine = engine,
                Cache = new FeatureCache(output, engine),
                Budget = budget,
                JobSlots = jobSlots,
                Observer = observer,
            };
            return new RootSession(rootLock, ctx, new SetCatalog(root, options))
            {
                Root = root,
                SweptTemporaries = swept,
                RecoveredSets = recovered,
                OutputOnNetworkShare = StoragePlace.IsNetworkPath(output),
                ServedThisRootBefore = before == WatchedRootRecord.Read(output),
            };
        }
        catch
        {
            rootLock?.Dispose();
            throw;
        }
    }

    public void Dispose()
    {
        Context.Store.Dispose();
        _lock?.Dispose();
    }
}
