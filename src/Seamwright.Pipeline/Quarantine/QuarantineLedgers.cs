using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Quarantine;

/// <summary>The quarantine ledger of an output root for its state provider (Seamwright:State:Provider).</summary>
public static class QuarantineLedgers
{
    /// <summary>
    /// SQLite: <paramref name="sqliteFileName"/> in the root's state folder (one node). PostgreSQL:
    /// the table in the root's shared schema, so strikes and quarantines count for every node.
    /// </summary>
    public static IQuarantineLedger Open(string outputRoot, string watchedRoot, StateSettings state, string node, string sqliteFileName)
    {
        ArgumentNullException.ThrowIfNull(state);
        string folder = Path.Combine(outputRoot, StateStore.StateFolder);
        Directory.CreateDirectory(folder);
        if (!StateProviders.IsPostgreSql(state.Provider))
        {
            return new SqliteQuarantineLedger(Path.Combine(folder, sqliteFileName));
        }
        string id = RootIdentity.Get(outputRoot, create: true)!;
        return new PostgreSqlQuarantineLedger(state.ConnectionString, RootIdentity.SchemaFor(id), watchedRoot, node, state.CommandTimeoutSeconds);
    }
}
