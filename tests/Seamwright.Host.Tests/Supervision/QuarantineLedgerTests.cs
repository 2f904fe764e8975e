using Npgsql;
using Seamwright.Pipeline.Quarantine;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Supervision;

/// <summary>The quarantine ledgers: in memory, SQLite, and PostgreSQL (the test server; shared by nodes).</summary>
public sealed class QuarantineLedgerTests(ITestOutputHelper output) : IDisposable
{
    private readonly string _folder = WorkerTestSupport.TempFolder("sw-ledger-");
    private readonly string _schema = "sw_test_" + Guid.NewGuid().ToString("N")[..12];
    private string? _postgres;
    private static readonly DateTimeOffset T0 = new(2026, 1, 2, 3, 4, 5, TimeSpan.Zero);

    public void Dispose()
    {
        Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
        Directory.Delete(_folder, true);
        if (_postgres is not null)
        {
            using var db = new NpgsqlConnection(_postgres);
            db.Open();
            using var cmd = new NpgsqlCommand($"DROP SCHEMA IF EXISTS \"{_schema}\" CASCADE", db);
            cmd.ExecuteNonQuery();
        }
    }

    /// <summary>The ledger of that kind, or null when it is PostgreSQL and no server is configured (skipped, with a message).</summary>
    private IQuarantineLedger? Make(string kind, string node = "node-a", string watchedRoot = "/in")
    {
        if (kind == "postgres")
        {
            _postgres ??= TestPostgres.ConnectionStringOrSkip(output.WriteLine);
            return _postgres is null ? null : new PostgreSqlQuarantineLedger(_postgres, _schema, watchedRoot, node);
        }
        return kind == "sqlite" ? new SqliteQuarantineLedger(Path.Combine(_folder, "state.db")) : new InMemoryQuarantineLedger();
    }

    private static FileIdentity File(string hash, long size = 10, string root = "/in") => new(root + "/a.png", size, 5, hash);

    [Theory]
    [InlineData("memory")]
    [InlineData("sqlite")]
    [InlineData("postgres")]
    public void AddStrike_SameFile_CountsUpAndQuarantineIsFound(string kind)
    {
        if (Make(kind) is not { } ledger)
        {
            return;
        }
        Assert.Equal(1, ledger.AddStrike(File("aa"), "crash", T0));
        Assert.Equal(2, ledger.AddStrike(File("aa"), "hang", T0));
        Assert.Null(ledger.FindQuarantined(File("aa")));
        ledger.Quarantine(File("aa"), "2 failed", T0);
        var entry = ledger.FindQuarantined(File("aa"));
        Assert.NotNull(entry);
        Assert.Equal(2, entry.Strikes);
        Assert.Equal("2 failed", entry.Reason);
        Assert.Equal(T0, entry.QuarantinedAt);
        Assert.Single(ledger.ListQuarantined());
        (ledger as IDisposable)?.Dispose();
    }

    [Theory]
    [InlineData("memory")]
    [InlineData("sqlite")]
    [InlineData("postgres")]
    public void FindQuarantined_FileChanged_ReleasedAndStrikesReset(string kind)
    {
        if (Make(kind) is not { } ledger)
        {
            return;
        }
        ledger.AddStrike(File("aa"), "crash", T0);
        ledger.Quarantine(File("aa"), "bad", T0);
        Assert.Null(ledger.FindQuarantined(File("bb")));
        Assert.Empty(ledger.ListQuarantined());
        Assert.Equal(1, ledger.AddStrike(File("bb"), "crash", T0));
        Assert.Equal(1, ledger.AddStrike(File("bb", size: 11), "crash", T0));
        (ledger as IDisposable)?.Dispose();
    }

    [Theory]
    [InlineData("memory")]
    [InlineData("sqlite")]
    [InlineData("postgres")]
    public void TakeInterrupted_MarkLeftSet_ReturnedOnceThenCleared(string kind)
    {
        if (Make(kind) is not { } ledger)
        {
            return;
        }
        ledger.MarkInProgress(File("aa"), T0);
        var other = new FileIdentity("/in/b.png", 1, 1, "cc");
        ledger.MarkInProgress(other, T0);
        ledger.ClearInProgress(other);
        Assert.Equal([File("aa")], ledger.TakeInterrupted());
        Assert.Empty(ledger.TakeInterrupted());
        (ledger as IDisposable)?.Dispose();
    }

    [Fact]
    public void Sqlite_Reopened_KeepsQuarantineAndInProgressMarks()
    {
        string db = Path.Combine(_folder, "state.db");
        using (var first = new SqliteQuarantineLedger(db))
        {
            first.AddStrike(File("aa"), "crash", T0);
            first.Quarantine(File("aa"), "bad", T0);
            first.MarkInProgress(File("aa"), T0);
        }
        using var second = new SqliteQuarantineLedger(db);
        Assert.NotNull(second.FindQuarantined(File("aa")));
        Assert.Single(second.TakeInterrupted());
    }

    [Fact]
    public void Postgres_TwoNodesMountingTheRootApart_ShareStrikesAndQuarantineButNotInProgressMarks()
    {
        using var a = (PostgreSqlQuarantineLedger?)Make("postgres", "node-a", "/in");
        if (a is null)
        {
            return;
        }
        using var b = (PostgreSqlQuarantineLedger)Make("postgres", "node-b", "/mnt/share/in")!;
        var onA = File("aa");
        var onB = File("aa", root: "/mnt/share/in");

        // A worker died on this file on node A, then on node B: one count.
        Assert.Equal(1, a.AddStrike(onA, "crash", T0));
        Assert.Equal(2, b.AddStrike(onB, "hang", T0));
        a.Quarantine(onA, "2 failed attempts", T0);
        var seen = b.FindQuarantined(onB);
        Assert.NotNull(seen);
        Assert.Equal(2, seen.Strikes);
        Assert.Equal(T0, seen.QuarantinedAt);
        Assert.Equal("/mnt/share/in/a.png", Assert.Single(b.ListQuarantined()).File.Path);
        Assert.Equal("/in/a.png", Assert.Single(a.ListQuarantined()).File.Path);

        // Each node takes only its own interrupted decodes: the other node's mark is a decode still running there.
        var other = new FileIdentity("/mnt/share/in/b.png", 1, 1, "cc");
        b.MarkInProgress(other, T0);
        Assert.Empty(a.TakeInterrupted());
        a.ClearInProgress(new FileIdentity("/in/b.png", 1, 1, "cc"));
        Assert.Equal([other], b.TakeInterrupted());
        Assert.Empty(b.TakeInterrupted());
    }

    [Fact]
    public void Open_PostgreSqlProvider_TheSharedLedgerOfTheRootsSchema()
    {
        if (TestPostgres.ConnectionStringOrSkip(output.WriteLine) is not { } conn)
        {
            return;
        }
        var state = new Seamwright.Pipeline.Settings.StateSettings { Provider = "PostgreSql", ConnectionString = conn };
        string outputRoot = Path.Combine(_folder, "out");
        using var first = (IDisposable)QuarantineLedgers.Open(outputRoot, "/in", state, "node-a", "decode-attempts.db");
        using var second = (IDisposable)QuarantineLedgers.Open(outputRoot, "/in", state, "node-b", "decode-attempts.db");
        string schema = Seamwright.Pipeline.State.RootIdentity.SchemaFor(Seamwright.Pipeline.State.RootIdentity.Get(outputRoot, create: false)!);
        try
        {
            Assert.IsType<PostgreSqlQuarantineLedger>(first);
            ((IQuarantineLedger)first).Quarantine(File("aa"), "bad", T0);
            Assert.NotNull(((IQuarantineLedger)second).FindQuarantined(File("aa")));
            Assert.False(System.IO.File.Exists(Path.Combine(outputRoot, ".seamwright", "decode-attempts.db")), "no SQLite ledger with the PostgreSql provider");
            var sqlite = QuarantineLedgers.Open(Path.Combine(_folder, "out2"), "/in", new Seamwright.Pipeline.Settings.StateSettings(), "node-a", "decode-attempts.db");
            Assert.IsType<SqliteQuarantineLedger>(sqlite);
            ((IDisposable)sqlite).Dispose();
        }
        finally
        {
            using var db = new NpgsqlConnection(conn);
            db.Open();
            using var cmd = new NpgsqlCommand($"DROP SCHEMA IF EXISTS \"{schema}\" CASCADE", db);
            cmd.ExecuteNonQuery();
        }
    }
}
