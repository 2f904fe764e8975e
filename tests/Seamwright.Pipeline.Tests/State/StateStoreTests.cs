using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.State;

public class StateStoreTests
{
    [Fact]
    public void Open_NewRoot_CreatesCurrentSchemaVersion()
    {
        using var dir = new ScratchFolder();
        using var store = StateStore.Open(dir.Path);
        Assert.Equal(StateSchema.Version, store.SchemaVersion());
    }

    [Fact]
    public void RecoverInterrupted_RunningRunLeftByCrash_AbandonedAndSetPending()
    {
        using var dir = new ScratchFolder();
        using (var store = StateStore.Open(dir.Path))
        {
            store.BeginRun("set1", "default", "fp", "0.1.0");
        }
        using var again = StateStore.Open(dir.Path);
        Assert.Equal(new[] { "set1" }, again.RecoverInterrupted());
        Assert.Equal("abandoned", again.Runs("set1").Single().State);
        Assert.Equal(SetStates.Pending, again.GetSet("set1")!.State);
    }

    [Fact]
    public void Acquire_SecondInstanceOnSameRoot_Refused()
    {
        using var dir = new ScratchFolder();
        using var first = OutputRootLock.Acquire(dir.Path);
        Assert.Throws<OutputRootBusyException>(() => OutputRootLock.Acquire(dir.Path));
    }

    [Fact]
    public void Open_NewerSchema_Refused()
    {
        using var dir = new ScratchFolder();
        using (var store = StateStore.Open(dir.Path))
        {
        }
        using (var db = new Microsoft.Data.Sqlite.SqliteConnection("Data Source=" + Path.Combine(dir.Path, StateStore.StateFolder, StateStore.DatabaseName) + ";Pooling=False"))
        {
            db.Open();
            using var cmd = db.CreateCommand();
            cmd.CommandText = "UPDATE meta SET value='99' WHERE key='schema_version'";
            cmd.ExecuteNonQuery();
        }
        Assert.Throws<InvalidOperationException>(() => StateStore.Open(dir.Path));
    }
}
