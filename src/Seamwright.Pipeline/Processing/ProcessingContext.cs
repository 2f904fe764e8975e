using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Processing;

/// <summary>Everything a set run needs that outlives the run: one per output root.</summary>
public sealed class ProcessingContext
{
    public required string OutputRoot { get; init; }
    /// <summary>
    /// Current settings; replaced whole on a configuration reload (reads are atomic reference loads).
    /// A set run never reads them after it began: it reads its <see cref="RunPlan"/> (<see cref="PlanFor"/>).
    /// </summary>
    public required SeamwrightOptions Options { get; set; }
    public required StateStore Store { get; init; }
    public required ConfidenceLog Log { get; init; }
    public required IPairEngine Engine { get; init; }
    public required FeatureCache Cache { get; init; }
    /// <summary>Each pair's outcome, keyed by both images and the pair fingerprint (see <see cref="PairResultCache"/>).</summary>
    public PairResultCache Pairs => _pairs ??= new PairResultCache(OutputRoot);
    private PairResultCache? _pairs;
    /// <summary>Shared by every decode of the process.</summary>
    public required MemoryBudget Budget { get; init; }
    /// <summary>Bounds image and pair jobs across all sets of the process.</summary>
    public required SemaphoreSlim JobSlots { get; init; }
    public IProcessingObserver Observer { get; init; } = NullObserver.Instance;
    /// <summary>This node's name (claims, runs; manifests and confidence records when the ledger is shared).</summary>
    public string NodeName { get; init; } = Environment.MachineName;
    /// <summary>How long a claim on a set lasts unless renewed (shared ledger only).</summary>
    public long LeaseMilliseconds { get; init; } = 30_000;
    /// <summary>The node name written into outputs: only when several nodes share the ledger, so one-node outputs stay as they were.</summary>
    public string? OutputNode => Store.IsShared ? NodeName : null;
    /// <summary>Checks accepted pairs of <c>frames</c> sets (rig baseline); null = no check. Set once before processing starts.</summary>
    public IPairReview? Review { get; set; }

    /// <summary>Version of the pipeline's own result shaping (planning, output content); bump when outputs change.</summary>
    public const int PipelineVersion = 2;

    public static string ToolVersion { get; } =
        typeof(ProcessingContext).Assembly.GetName().Version?.ToString(3) ?? "0.0.0";

    /// <summary>The algorithm version recorded in outputs and fingerprinted: pipeline and engine versions.</summary>
    public int AlgorithmVersion => AlgorithmVersionOf(Engine);

    /// <summary>The algorithm version of outputs made with this engine (the one formula; the run plan and the up-to-date check both use it).</summary>
    public static int AlgorithmVersionOf(IPairEngine engine)
    {
        ArgumentNullException.ThrowIfNull(engine);
        return PipelineVersion * 1000 + engine.AlgorithmVersion;
    }

    /// <summary>The run plan of a set of this profile under the current settings: resolved once at the start of each run.</summary>
    public RunPlan PlanFor(string profile) => RunPlan.Resolve(Options, profile, Engine.Name, AlgorithmVersion);

    /// <summary>The fingerprint a run of this profile would record under the current settings (<see cref="RunPlan.FingerprintOf"/>).</summary>
    public string FingerprintFor(string profile) => Fingerprint(Options, Engine, profile);

    /// <summary>The settings fingerprint of a profile's sets under these settings and engine, without a context.</summary>
    public static string Fingerprint(SeamwrightOptions options, IPairEngine engine, string profile)
    {
        ArgumentNullException.ThrowIfNull(engine);
        return RunPlan.FingerprintOf(options, profile, engine.Name, AlgorithmVersionOf(engine));
    }

    /// <summary>True when the ledger says the set's last finished run used these inputs and settings and its manifest exists.</summary>
    public bool IsUpToDate(Sets.SetInputs set)
    {
        ArgumentNullException.ThrowIfNull(set);
        var rec = Store.GetSet(set.SetId);
        return rec is { State: SetStates.Done }
            && rec.Fingerprint == FingerprintFor(set.Profile)
            && rec.Inputs == set.InputsDigest()
            && File.Exists(Path.Combine(OutputLayout.SetFolder(OutputRoot, set.SetId), OutputLayout.ManifestName));
    }
}
