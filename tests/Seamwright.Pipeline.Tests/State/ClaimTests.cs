using Npgsql;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.State;

/// <summary>Claims and leases on the shared (PostgreSQL) ledger, against the test server.</summary>
public class ClaimTests(ITestOutputHelper output)
{
    private StateStore? Open(string root)
    {
        string? conn = TestPostgres.ConnectionStringOrSkip(output.WriteLine);
        return conn is null ? null : StateStore.Open(root, new StateSettings { Provider = StateProviders.PostgreSql, ConnectionString = conn });
    }

    [Fact]
    public void TryClaim_HeldByLiveNode_RefusedThenTakenOverAfterLeaseRunsOut()
    {
        using var dir = new ScratchFolder();
        using var a = Open(dir.Path);
        if (a is null)
        {
            return;
        }
        using var b = Open(dir.Path)!; // a second node: its own connections, same schema (same root identity)
        Assert.True(a.TryClaim("s1", "A", 800).Claimed);
        long run = a.BeginRun("s1", "default", "fp", "1", "A");
        var refused = b.TryClaim("s1", "B", 800);
        Assert.Equal((false, "A"), (refused.Claimed, refused.HeldBy));
        Thread.Sleep(1200); // A stops beating: its lease runs out
        var taken = b.TryClaim("s1", "B", 60_000);
        Assert.Equal((true, "A", true), (taken.Claimed, taken.HeldBy, taken.TookOver));
        Assert.Equal("abandoned", b.GetRun(run)!.State);
        Assert.False(a.HoldsClaim("s1", "A", 60_000)); // A must not publish now
        Assert.True(b.HoldsClaim("s1", "B", 60_000));
    }

    [Fact]
    public void Beat_RenewsLeases_ClaimSurvivesPastItsFirstLease()
    {
        using var dir = new ScratchFolder();
        using var a = Open(dir.Path);
        if (a is null)
        {
            return;
        }
        using var b = Open(dir.Path)!;
        a.RegisterNode("A", 1);
        Assert.True(a.TryClaim("s1", "A", 5000).Claimed);
        for (int i = 0; i < 4; i++)
        {
            Thread.Sleep(1500); // 6 s in all: past the first 5 s lease
            Assert.Equal(1, a.Beat("A", 1, 5000));
        }
        Assert.False(b.TryClaim("s1", "B", 1000).Claimed);
        var node = b.Nodes().Single();
        Assert.Equal("A", node.Node);
        Assert.Equal(["s1"], node.Sets);
        a.ReleaseClaim("s1", "A");
        Assert.True(b.TryClaim("s1", "B", 1000).Claimed);
        Assert.Empty(b.Nodes().Single().Sets);
    }

    [Fact]
    public void TryClaim_RowLockedByAnotherSession_SkippedWithoutWaiting()
    {
        using var dir = new ScratchFolder();
        using var a = Open(dir.Path);
        if (a is null)
        {
            return;
        }
        Assert.True(a.TryClaim("s1", "A", 1).Claimed);
        Thread.Sleep(50); // lease expired: only the row lock stands in the way now
        string schema = RootIdentity.SchemaFor(RootIdentity.Get(dir.Path, create: false)!);
        var csb = new NpgsqlConnectionStringBuilder(TestPostgres.ConnectionStringOrSkip(output.WriteLine)) { SearchPath = schema };
        using var holder = new NpgsqlConnection(csb.ToString());
        holder.Open();
        using var tx = holder.BeginTransaction();
        using (var cmd = new NpgsqlCommand("SELECT * FROM claims WHERE set_id='s1' FOR UPDATE", holder, tx))
        {
            cmd.ExecuteNonQuery();
        }
        var started = System.Diagnostics.Stopwatch.StartNew();
        var attempt = a.TryClaim("s1", "B", 1000);
        Assert.False(attempt.Claimed);
        Assert.True(started.Elapsed < TimeSpan.FromSeconds(20), "SKIP LOCKED must not wait for the other session");
        tx.Rollback();
        Assert.True(a.TryClaim("s1", "B", 1000).Claimed);
    }

    [Fact]
    public void TryClaim_ManyNodesRacing_EachSetWonExactlyOnce()
    {
        using var dir = new ScratchFolder();
        using var first = Open(dir.Path);
        if (first is null)
        {
            return;
        }
        var stores = Enumerable.Range(0, 4).Select(_ => Open(dir.Path)!).ToList();
        var sets = Enumerable.Range(0, 30).Select(i => "set" + i).ToList();
        var wins = new System.Collections.Concurrent.ConcurrentBag<(string Set, string Node)>();
        Parallel.For(0, stores.Count * 2, new ParallelOptions { MaxDegreeOfParallelism = 8 }, k =>
        {
            string node = "N" + (k % stores.Count);
            foreach (var s in sets)
            {
                if (stores[k % stores.Count].TryClaim(s, node, 60_000).Claimed)
                {
                    wins.Add((s, node));
                }
            }
        });
        // The same node may win its own claim again (a renewal); different nodes never share a set.
        var winners = wins.GroupBy(w => w.Set).ToDictionary(g => g.Key, g => g.Select(w => w.Node).Distinct().ToList());
        Assert.Equal(sets.Count, winners.Count);
        Assert.All(winners.Values, nodes => Assert.Single(nodes));
        foreach (var s in stores)
        {
            s.Dispose();
        }
    }

    [Fact]
    public void RecoverInterrupted_SharedLedger_OnlyThisNodesRunsAbandoned()
    {
        using var dir = new ScratchFolder();
        using var a = Open(dir.Path);
        if (a is null)
        {
            return;
        }
        long mine = a.BeginRun("s1", "default", "fp", "1", "A");
        long theirs = a.BeginRun("s2", "default", "fp", "1", "B");
        Assert.Equal(["s1"], a.RecoverInterrupted("A"));
        Assert.Equal(("abandoned", "running"), (a.GetRun(mine)!.State, a.GetRun(theirs)!.State));
    }
}
