using System.Data.Common;
using System.Globalization;
using Microsoft.Data.Sqlite;

namespace Seamwright.Pipeline.State;

/// <summary>The embedded ledger: one SQLite connection (write-ahead log, full sync) used under a lock.</summary>
internal sealed class SqliteLedger : LedgerDialect
{
    private readonly SqliteConnection _db;
    private readonly Lock _gate = new();

    public SqliteLedger(string path, bool readOnly)
    {
        Location = path;
        var csb = new SqliteConnectionStringBuilder
        {
            DataSource = path,
            Mode = readOnly ? SqliteOpenMode.ReadOnly : SqliteOpenMode.ReadWriteCreate,
            Pooling = false,
            DefaultTimeout = 30,
        };
        _db = new SqliteConnection(csb.ToString());
        _db.Open();
        using var cmd = _db.CreateCommand();
        cmd.CommandText = readOnly
            ? "PRAGMA busy_timeout=30000;"
            : "PRAGMA journal_mode=WAL; PRAGMA synchronous=FULL; PRAGMA busy_timeout=30000;";
        cmd.ExecuteNonQuery();
    }

    public override string Name => StateProviders.Sqlite;

    public override string Location { get; }

    public override T Use<T>(Func<DbConnection, T> work)
    {
        lock (_gate)
        {
            return work(_db);
        }
    }

    public override string Ddl(string template) =>
        template.Replace("{bigint}", "INTEGER", StringComparison.Ordinal)
            .Replace("{serial}", "INTEGER PRIMARY KEY AUTOINCREMENT", StringComparison.Ordinal);

    public override string NowMilliseconds => "CAST((julianday('now') - 2440587.5) * 86400000 AS INTEGER)";

    public override string ForUpdateSkipLocked => "";

    public override int StoredVersion(DbConnection db, DbTransaction? tx = null)
    {
        using var cmd = db.CreateCommand();
        cmd.Transaction = tx;
        cmd.CommandText = "SELECT name FROM sqlite_master WHERE type='table' AND name='meta'";
        if (cmd.ExecuteScalar() is null)
        {
            return 0;
        }
        cmd.CommandText = "SELECT value FROM meta WHERE key='schema_version'";
        return cmd.ExecuteScalar() is string s ? int.Parse(s, CultureInfo.InvariantCulture) : 0;
    }

    public override void Dispose() => _db.Dispose();
}
