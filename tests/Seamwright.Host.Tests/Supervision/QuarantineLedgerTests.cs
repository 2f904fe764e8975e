using Seamwright.Pipeline.Quarantine;

namespace Seamwright.Host.Tests.Supervision;

public sealed class QuarantineLedgerTests : IDisposable
{
    private readonly string _folder = WorkerTestSupport.TempFolder("sw-ledger-");
    private static readonly DateTimeOffset T0 = new(2026, 1, 2, 3, 4, 5, TimeSpan.Zero);

    public void Dispose()
    {
        Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
        Directory.Delete(_folder, true);
    }

    private IQuarantineLedger Make(string kind) =>
        kind == "sqlite" ? new SqliteQuarantineLedger(Path.Combine(_folder, "state.db")) : new InMemoryQuarantineLedger();

    private static FileIdentity File(string hash, long size = 10) => new("/in/a.png", size, 5, hash);

    [Theory]
    [InlineData("memory")]
    [InlineData("sqlite")]
    public void AddStrike_SameFile_CountsUpAndQuarantineIsFound(string kind)
    {
        var ledger = Make(kind);
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
    public void FindQuarantined_FileChanged_ReleasedAndStrikesReset(string kind)
    {
        var ledger = Make(kind);
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
    public void TakeInterrupted_MarkLeftSet_ReturnedOnceThenCleared(string kind)
    {
        var ledger = Make(kind);
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
}
