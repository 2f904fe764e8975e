using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Processing;

/// <summary>
/// A node whose claim runs out in the middle of a run (shared ledger, the PostgreSQL test server)
/// publishes nothing: not a sidecar, not a confidence record, not the manifest, and leaves the
/// set's state to the node that holds it now.
/// </summary>
public class LeaseLossTests(ITestOutputHelper output)
{
    private const double ShortLeaseSeconds = 1.5;

    /// <summary>Calls <see cref="OnPlanned"/> once the pairs are planned: mid-run, after the images, before anything is published.</summary>
    private sealed class MidRun : IProcessingObserver
    {
        public Action? OnPlanned { get; set; }

        public void SetStarted(string setId, long runId, int images) { }

        public void ImageDone(string setId, string image, bool fromCache) { }

        public void BadFile(string setId, string image, string reason) { }

        public void PairsPlanned(string setId, int pairs) => OnPlanned?.Invoke();

        public void PairDone(string setId, string imageA, string imageB, PairStatus status, IReadOnlyList<string> reasons) { }

        public void SetFinished(SetOutcome outcome) { }
    }

    private RootSession? OpenNode(ScratchFolder dir, string node, double leaseSeconds, IProcessingObserver observer)
    {
        string? conn = TestPostgres.ConnectionStringOrSkip(output.WriteLine);
        if (conn is null)
        {
            return null;
        }
        var options = Sessions.Options();
        options.State = new StateSettings { Provider = StateProviders.PostgreSql, ConnectionString = conn, LeaseSeconds = leaseSeconds };
        options.Service.NodeName = node;
        return RootSession.Open(options.RootFor(dir.Sub("in"), dir.Sub("out")), options, new ChecksumEngine(), new MemoryBudget(256L << 20), new SemaphoreSlim(2), observer);
    }

    /// <summary>Everything a reader of the output root sees (the ledger's folder aside), by path.</summary>
    private static Dictionary<string, string> Visible(string outputRoot) =>
        TestImages.Hashes(outputRoot).Where(kv => !kv.Key.StartsWith(StateStore.StateFolder, StringComparison.Ordinal)).ToDictionary();

    private static List<string> Temporaries(string outputRoot) =>
        [.. Directory.EnumerateFiles(outputRoot, "*", SearchOption.AllDirectories).Where(AtomicFile.IsTemporary)];

    [Fact]
    public void Process_ClaimTakenOverMidRunAndSetFinishedByTheOtherNode_NothingPublishedTheOtherNodesOutputsStand()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 4, 300);
        var slow = new MidRun();
        using var a = OpenNode(dir, "A", ShortLeaseSeconds, slow);
        if (a is null)
        {
            return;
        }
        using var b = OpenNode(dir, "B", 60, NullObserver.Instance)!;
        var set = a.Catalog.Discover().Single();
        SetOutcome? taken = null;
        Dictionary<string, string>? afterB = null;
        slow.OnPlanned = () =>
        {
            // A is cut off for longer than its lease (nothing renews it here); B takes the set over and finishes it.
            Thread.Sleep(TimeSpan.FromSeconds(ShortLeaseSeconds + 1));
            taken = new SetProcessor(b.Context).Process(b.Catalog.Discover().Single(), false, CancellationToken.None);
            afterB = Visible(dir.Sub("out"));
        };

        var outcome = new SetProcessor(a.Context).Process(set, false, CancellationToken.None);

        Assert.Equal(SetOutcomeKind.Done, taken!.Kind);
        Assert.Equal(SetOutcomeKind.Deferred, outcome.Kind);
        Assert.Contains("lost its claim", outcome.Reason, StringComparison.Ordinal);
        // Not one byte of B's publication changed: A wrote no sidecar, tie point, record or manifest.
        Assert.Equal(afterB, Visible(dir.Sub("out")));
        var manifest = OutputJson.ReadManifest(Path.Combine(dir.Sub("out/s"), OutputLayout.ManifestName));
        Assert.Equal(("B", taken.RunId), (manifest.Node, (long?)manifest.Run));
        Assert.All(ConfidenceLog.ReadAll(Path.Combine(dir.Sub("out"), ConfidenceLog.FileName)), r => Assert.Equal(taken.RunId, r.Run));
        Assert.Empty(Temporaries(dir.Sub("out")));
        // The ledger: A's run abandoned, the set B's, done by B's run.
        var record = b.Context.Store.GetSet("s")!;
        Assert.Equal((SetStates.Done, taken.RunId), (record.State, record.DoneRun));
        Assert.Equal("abandoned", b.Context.Store.GetRun(outcome.RunId!.Value)!.State);
    }

    [Fact]
    public void Process_LeaseRanOutMidRunNobodyTookOver_SetFolderNeverCreated()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 4, 400);
        var slow = new MidRun { OnPlanned = () => Thread.Sleep(TimeSpan.FromSeconds(ShortLeaseSeconds + 1)) };
        using var a = OpenNode(dir, "A", ShortLeaseSeconds, slow);
        if (a is null)
        {
            return;
        }

        var outcome = new SetProcessor(a.Context).Process(a.Catalog.Discover().Single(), false, CancellationToken.None);

        Assert.Equal(SetOutcomeKind.Deferred, outcome.Kind);
        Assert.Contains("before writing anything", outcome.Reason, StringComparison.Ordinal);
        Assert.False(Directory.Exists(dir.Sub("out/s")), "the set's output folder was touched");
        Assert.Empty(ConfidenceLog.ReadAll(Path.Combine(dir.Sub("out"), ConfidenceLog.FileName)));
        Assert.Empty(Temporaries(dir.Sub("out")));
        Assert.Equal("abandoned", a.Context.Store.GetRun(outcome.RunId!.Value)!.State);
    }
}
