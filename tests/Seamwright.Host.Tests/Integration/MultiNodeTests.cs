using System.Diagnostics;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// Three real <c>watch</c> processes sharing one watched root, one output root and a PostgreSQL
/// ledger (the test server from <c>SEAMWRIGHT_TEST_PG</c>, or a private cluster for the outage
/// test). Sets are small (checksum engine, 96 x 96 images) so each test takes a minute or two.
/// </summary>
[Collection(nameof(MultiNodeTests))]
public class MultiNodeTests(ITestOutputHelper output)
{
    private const int Sets = 24, PerSet = 12;
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(5);
    private static readonly string[] Names = ["n1", "n2", "n3"];

    [Fact]
    public void Watch_ThreeNodesOneKilledTenTimes_EverySetCompleteOnceNoDuplicates()
    {
        string? conn = TestPostgres.ConnectionStringOrSkip(output.WriteLine);
        if (conn is null)
        {
            return;
        }
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        using var cluster = new NodeCluster(dir.Path, dir.Sub("in"), dir.Sub("out"), conn, leaseSeconds: 4);
        foreach (var n in Names)
        {
            cluster.Start(n);
        }
        foreach (var n in Names)
        {
            cluster.WaitRegistered(n, Limit);
        }
        NodeCluster.DropSets(dir.Sub("in"), Sets, PerSet);
        var inputs = InputHashes(dir.Sub("in"));
        var clock = Stopwatch.StartNew();

        // Seeded only so that a failure can be replayed; the moments are not a result.
        var random = new Random(20261202);
        int kills = 0, killsHoldingClaims = 0;
        while (kills < 10 || cluster.Read(st => st.Sets().Count(s => s.State == SetStates.Done)) < Sets)
        {
            Thread.Sleep(random.Next(1500, 4000));
            bool heldClaims = cluster.Read(st => st.Nodes().Any(n => n.Node == "n1" && n.Sets.Count > 0));
            if (kills >= 10)
            {
                break;
            }
            cluster.Kill("n1");
            kills++;
            killsHoldingClaims += heldClaims ? 1 : 0;
            cluster.Start("n1");
            cluster.WaitRegistered("n1", Limit);
        }
        cluster.WaitUntil(st => st.Sets().Count(s => s.State == SetStates.Done) == Sets && st.Sets().Count == Sets, Limit, "every set done");
        double seconds = clock.Elapsed.TotalSeconds;
        cluster.StopAll();

        var records = NodeCluster.CheckComplete(dir.Sub("out"), Sets, PerSet);
        var (runs, sets) = cluster.Read(st => (st.Runs(), st.Sets()));
        Assert.DoesNotContain(runs, r => r.State == "running");
        var byNode = runs.Where(r => r.State == "done").GroupBy(r => r.Node ?? "").ToDictionary(g => g.Key, g => g.Count());
        Assert.True(byNode.Count >= 2, "work done by: " + string.Join(", ", byNode.Select(kv => $"{kv.Key} {kv.Value}")));
        Assert.Equal(inputs, InputHashes(dir.Sub("in")));
        // Every set's newest manifest is the ledger's current run for it.
        foreach (var s in sets)
        {
            Assert.Equal(s.DoneRun, OutputJson.ReadManifest(Path.Combine(Pipeline.Processing.OutputLayout.SetFolder(dir.Sub("out"), s.SetId), Pipeline.Processing.OutputLayout.ManifestName)).Run);
        }
        Assert.True(kills >= 10);
        output.WriteLine($"kill: {Sets} sets x {PerSet} images dropped at once on 3 nodes; {kills} SIGKILLs of n1 ({killsHoldingClaims} while it held claims); " +
            $"all done after {seconds:0.0} s; runs {runs.Count} ({runs.Count(r => r.State == "abandoned")} abandoned, {runs.Count(r => r.State == "done")} done; " +
            $"done by node: {string.Join(", ", byNode.OrderBy(kv => kv.Key).Select(kv => $"{kv.Key} {kv.Value}"))}); confidence records {records.Count}; duplicates 0; " +
            $"sets lost {Sets - sets.Count(s => s.State == SetStates.Done)}");
    }

    [Fact]
    public void Watch_ThreeNodesVersusOneSqliteNode_SameOutputsAndTimes()
    {
        string? conn = TestPostgres.ConnectionStringOrSkip(output.WriteLine);
        if (conn is null)
        {
            return;
        }
        using var dir = new ScratchFolder();
        // One node, the default SQLite ledger.
        Directory.CreateDirectory(dir.Sub("one/in"));
        double oneSeconds;
        using (var one = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("one/in"), "--output", dir.Sub("one/out"), .. SeamwrightProcess.FastSettings]))
        {
            Ledger.WaitUntil(dir.Sub("one/out"), _ => true, Limit, "the single node to start", one);
            NodeCluster.DropSets(dir.Sub("one/in"), Sets, PerSet);
            var clock = Stopwatch.StartNew();
            Ledger.WaitUntil(dir.Sub("one/out"), st => st.Sets().Count(s => s.State == SetStates.Done) == Sets, Limit, "every set done on one node", one);
            oneSeconds = clock.Elapsed.TotalSeconds;
            one.Terminate();
            Assert.True(one.WaitForExit(TimeSpan.FromSeconds(60)));
        }
        // Three nodes, the shared PostgreSQL ledger, the same inputs.
        Directory.CreateDirectory(dir.Sub("three/in"));
        double threeSeconds;
        using (var cluster = new NodeCluster(dir.Path, dir.Sub("three/in"), dir.Sub("three/out"), conn, leaseSeconds: 10))
        {
            foreach (var n in Names)
            {
                cluster.Start(n);
            }
            cluster.WaitUntil(st => st.Nodes().Count == Names.Length, Limit, "three nodes registered");
            NodeCluster.DropSets(dir.Sub("three/in"), Sets, PerSet);
            var clock = Stopwatch.StartNew();
            cluster.WaitUntil(st => st.Sets().Count(s => s.State == SetStates.Done) == Sets, Limit, "every set done on three nodes");
            threeSeconds = clock.Elapsed.TotalSeconds;
            cluster.StopAll();
            NodeCluster.CheckComplete(dir.Sub("three/out"), Sets, PerSet);
        }

        var a = NodeCluster.ComparableOutputs(dir.Sub("one/out"));
        var b = NodeCluster.ComparableOutputs(dir.Sub("three/out"));
        Assert.Equal(a.Keys.Order(StringComparer.Ordinal), b.Keys.Order(StringComparer.Ordinal));
        Assert.All(a, kv => Assert.True(kv.Value == b[kv.Key], kv.Key + " differs between one SQLite node and three PostgreSQL nodes"));
        var oneRuns = Ledger.Read(dir.Sub("one/out"), st => st.Sets().ToDictionary(s => s.SetId, s => s.DoneRun ?? -1));
        using var shared = StateStore.Open(dir.Sub("three/out"), new Pipeline.Settings.StateSettings { Provider = StateProviders.PostgreSql, ConnectionString = conn }, readOnly: true);
        var threeRuns = shared.Sets().ToDictionary(s => s.SetId, s => s.DoneRun ?? -1);
        var ra = NodeCluster.ComparableRecords(dir.Sub("one/out"), s => oneRuns[s]);
        var rb = NodeCluster.ComparableRecords(dir.Sub("three/out"), s => threeRuns[s]);
        Assert.Equal(ra.Count, rb.Count);
        Assert.All(ra, kv => Assert.Equal(kv.Value, rb[kv.Key]));
        output.WriteLine($"same outputs: {a.Count} files and {ra.Count} confidence records equal (run ids, node names, timings aside); " +
            $"{Sets} sets x {PerSet} images: one SQLite node {oneSeconds:0.0} s, three PostgreSQL nodes {threeSeconds:0.0} s (2-core shared machine)");
    }

    /// <summary>The images dropped, byte for byte (the service's own canary file in the watched root aside).</summary>
    private static Dictionary<string, string> InputHashes(string root) =>
        TestImages.Hashes(root).Where(kv => !kv.Key.StartsWith(".seamwright", StringComparison.Ordinal)).ToDictionary();
}
