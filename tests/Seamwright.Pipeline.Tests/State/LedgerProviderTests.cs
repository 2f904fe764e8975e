using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.State;

/// <summary>The same ledger operations on both providers: SQLite (always) and PostgreSQL (the test server).</summary>
public class LedgerProviderTests(ITestOutputHelper output)
{
    public static TheoryData<string> Providers => new() { StateProviders.Sqlite, StateProviders.PostgreSql };

    private StateStore? Open(string provider, string root)
    {
        if (provider == StateProviders.Sqlite)
        {
            return StateStore.Open(root, new StateSettings());
        }
        string? conn = TestPostgres.ConnectionStringOrSkip(output.WriteLine);
        return conn is null ? null : StateStore.Open(root, new StateSettings { Provider = StateProviders.PostgreSql, ConnectionString = conn });
    }

    [Theory]
    [MemberData(nameof(Providers))]
    public void Open_NewRoot_CurrentSchemaOnEitherProvider(string provider)
    {
        using var dir = new ScratchFolder();
        using var store = Open(provider, dir.Path);
        if (store is null)
        {
            return;
        }
        Assert.Equal(StateSchema.Version, store.SchemaVersion());
        Assert.Equal(provider, store.Provider);
    }

    [Theory]
    [MemberData(nameof(Providers))]
    public void FinishRun_RoundTrip_SameRecordsOnEitherProvider(string provider)
    {
        using var dir = new ScratchFolder();
        using var store = Open(provider, dir.Path);
        if (store is null)
        {
            return;
        }
        Assert.Equal(["a/1.png", "a/2.png"], store.ObserveFiles([("a/1.png", "a", 10L, 1L), ("a/2.png", "a", 20L, 2L)]));
        Assert.False(store.ObserveFile("a/1.png", "a", 10, 1));
        long run = store.BeginRun("a", "default", "fp1", "1.0.0", "node-x");
        store.FinishRun(run, "a", "fp1", "digest", new RunSummary(2, 0, 1, 1, 0, 0, false),
            [new PairResultRecord("1.png", "2.png", "accepted", 40, 60, "")],
            [new FileOutcome("a/1.png", 10, 1, "h1", true, null), new FileOutcome("a/2.png", 20, 2, null, false, "not an image")]);
        var set = store.GetSet("a")!;
        Assert.Equal((SetStates.Done, "fp1", "digest", (long?)run), (set.State, set.Fingerprint, set.Inputs, set.DoneRun));
        var rec = store.GetRun(run)!;
        Assert.Equal(("done", "node-x", 2, 1), (rec.State, rec.Node, rec.Summary!.Images, rec.Summary.Accepted));
        Assert.Equal(40, store.PairResults(run).Single().Inliers);
        Assert.Equal(["analysed", "bad"], store.Files("a").Select(f => f.State));
        Assert.Equal("not an image", store.Failures("a").Single().Reason);
        long second = store.BeginRun("a", "default", "fp1", "1.0.0", "node-x");
        store.AbandonRun(second, "a", SetStates.Pending, "default", "changed");
        long third = store.BeginRun("a", "default", "fp1", "1.0.0", "node-x");
        store.AbandonRun(third, "a", SetStates.Pending, "default", "changed");
        var pruned = store.PruneRuns(keepOld: 0);
        Assert.Equal([second], pruned.Single().Runs);
        Assert.NotNull(store.RunStartedUtc(second));
    }

    [Theory]
    [MemberData(nameof(Providers))]
    public void RetireSet_DoneSet_RetiredWithReasonItsFilesRemovedOthersKeptOnEitherProvider(string provider)
    {
        using var dir = new ScratchFolder();
        using var store = Open(provider, dir.Path);
        if (store is null)
        {
            return;
        }
        store.ObserveFiles([("a/1.png", "a", 10L, 1L), ("b/1.png", "b", 10L, 1L)]);
        long run = store.BeginRun("a", "maps", "fp1", "1.0.0");
        store.FinishRun(run, "a", "fp1", "digest", new RunSummary(1, 0, 0, 0, 0, 0, false), [], [new FileOutcome("a/1.png", 10, 1, "h1", true, null)]);

        store.RetireSet("a", "maps", "set folder removed");

        var set = store.GetSet("a")!;
        Assert.Equal((SetStates.Retired, "maps", "set folder removed", (long?)run), (set.State, set.Profile, set.Reason, set.DoneRun));
        Assert.Equal(["removed"], store.Files("a").Select(f => f.State));
        Assert.Equal(["seen"], store.Files("b").Select(f => f.State));
    }

    [Fact]
    public void Open_SqliteLedgerOfVersion1_MigratedToCurrentKeepingRows()
    {
        using var dir = new ScratchFolder();
        string path = Path.Combine(dir.Path, StateStore.StateFolder, StateStore.DatabaseName);
        Directory.CreateDirectory(Path.GetDirectoryName(path)!);
        using (var db = new Microsoft.Data.Sqlite.SqliteConnection("Data Source=" + path + ";Pooling=False"))
        {
            db.Open();
            using var cmd = db.CreateCommand();
            // The version-1 tables as earlier builds created them, with one run.
            cmd.CommandText = StateSchema.V1.Replace("{bigint}", "INTEGER", StringComparison.Ordinal)
                    .Replace("{serial}", "INTEGER PRIMARY KEY AUTOINCREMENT", StringComparison.Ordinal)
                + "INSERT INTO meta VALUES('schema_version', '1');"
                + "INSERT INTO runs(set_id, state, fingerprint, tool_version, started) VALUES('s', 'done', 'fp', '0.1.0', 5);";
            cmd.ExecuteNonQuery();
        }
        using var store = StateStore.Open(dir.Path);
        Assert.Equal(StateSchema.Version, store.SchemaVersion());
        var run = store.Runs("s").Single();
        Assert.Null(run.Node);
        Assert.True(store.TryClaim("s", "n1", 1000).Claimed);
    }
}
