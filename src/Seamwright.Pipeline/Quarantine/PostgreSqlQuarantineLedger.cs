using System.Data.Common;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Quarantine;

/// <summary>
/// <see cref="IQuarantineLedger"/> shared by every node of an output root: the table
/// decode_attempts in the root's PostgreSQL schema (the schema of its state ledger, named from
/// <c>.seamwright/root-id</c>). The same semantics as <see cref="SqliteQuarantineLedger"/>, plus
/// what several nodes need: strikes and quarantines count for every node (a file that killed a
/// worker on one node is not tried on the next); files are keyed by their path relative to the
/// watched root, so nodes that mount the root at different paths agree; an in-progress mark names
/// its node, and <see cref="TakeInterrupted"/> takes only this node's marks (another node's mark is
/// a decode still running there). Each call is one transaction on a pooled connection.
/// </summary>
public sealed class PostgreSqlQuarantineLedger : IQuarantineLedger, IDisposable
{
    private const string Table = """
        CREATE TABLE IF NOT EXISTS decode_attempts (
          path TEXT PRIMARY KEY,
          size BIGINT NOT NULL,
          mtime_ticks BIGINT NOT NULL,
          sha256 TEXT NOT NULL,
          strikes INTEGER NOT NULL DEFAULT 0,
          reason TEXT,
          in_progress_since TIMESTAMPTZ,
          in_progress_node TEXT,
          quarantined_at TIMESTAMPTZ,
          last_node TEXT
        );
        """;

    private readonly PostgreSqlLedger _db;
    private readonly string _watchedRoot;
    private readonly string _node;

    /// <param name="connectionString">Npgsql connection string (Seamwright:State:ConnectionString).</param>
    /// <param name="schema">The output root's schema (<see cref="RootIdentity.SchemaFor"/>).</param>
    /// <param name="watchedRoot">This node's path of the watched root (file paths are stored relative to it).</param>
    /// <param name="node">This node's name (Seamwright:Service:NodeName).</param>
    /// <param name="commandTimeoutSeconds">Seamwright:State:CommandTimeoutSeconds.</param>
    public PostgreSqlQuarantineLedger(string connectionString, string schema, string watchedRoot, string node, int commandTimeoutSeconds = 30)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(connectionString);
        ArgumentException.ThrowIfNullOrWhiteSpace(watchedRoot);
        ArgumentException.ThrowIfNullOrWhiteSpace(node);
        _watchedRoot = Path.GetFullPath(watchedRoot);
        _node = node;
        _db = new PostgreSqlLedger(connectionString, schema, commandTimeoutSeconds);
        InTransaction((db, tx) =>
        {
            // Several nodes starting at once: one creates the schema and the table, the others wait.
            using var cmd = Command(db, tx, $"SELECT pg_advisory_xact_lock(hashtext(@s)); CREATE SCHEMA IF NOT EXISTS \"{schema}\"; " + Table);
            Add(cmd, "s", "seamwright:" + schema);
            cmd.ExecuteNonQuery();
            return 0;
        });
    }

    public QuarantineEntry? FindQuarantined(FileIdentity file) => InTransaction((db, tx) =>
    {
        ForgetIfChanged(db, tx, file);
        using var cmd = Command(db, tx, "SELECT strikes, reason, quarantined_at FROM decode_attempts WHERE path=@p AND quarantined_at IS NOT NULL", file);
        using var reader = cmd.ExecuteReader();
        return reader.Read()
            ? new QuarantineEntry(file, reader.GetInt32(0), reader.IsDBNull(1) ? "" : reader.GetString(1), reader.GetFieldValue<DateTimeOffset>(2))
            : null;
    });

    public void MarkInProgress(FileIdentity file, DateTimeOffset at) => InTransaction((db, tx) =>
    {
        Upsert(db, tx, file);
        using var cmd = Command(db, tx, "UPDATE decode_attempts SET in_progress_since=@t, in_progress_node=@n WHERE path=@p", file);
        Add(cmd, "t", at.ToUniversalTime());
        Add(cmd, "n", _node);
        return cmd.ExecuteNonQuery();
    });

    /// <summary>Clears this node's mark (a mark another node set since stays: that decode is running there).</summary>
    public void ClearInProgress(FileIdentity file) => InTransaction((db, tx) =>
    {
        using var cmd = Command(db, tx, "UPDATE decode_attempts SET in_progress_since=NULL, in_progress_node=NULL WHERE path=@p AND in_progress_node=@n", file);
        Add(cmd, "n", _node);
        return cmd.ExecuteNonQuery();
    });

    public int AddStrike(FileIdentity file, string reason, DateTimeOffset at) => InTransaction((db, tx) =>
    {
        Upsert(db, tx, file);
        using var cmd = Command(db, tx, "UPDATE decode_attempts SET strikes=strikes+1, reason=@r, last_node=@n WHERE path=@p RETURNING strikes", file);
        Add(cmd, "r", reason);
        Add(cmd, "n", _node);
        return Convert.ToInt32(cmd.ExecuteScalar(), System.Globalization.CultureInfo.InvariantCulture);
    });

    public void Quarantine(FileIdentity file, string reason, DateTimeOffset at) => InTransaction((db, tx) =>
    {
        Upsert(db, tx, file);
        using var cmd = Command(db, tx, "UPDATE decode_attempts SET reason=@r, quarantined_at=@t, last_node=@n WHERE path=@p", file);
        Add(cmd, "r", reason);
        Add(cmd, "t", at.ToUniversalTime());
        Add(cmd, "n", _node);
        return cmd.ExecuteNonQuery();
    });

    public IReadOnlyList<QuarantineEntry> ListQuarantined() => InTransaction((db, tx) =>
    {
        using var cmd = Command(db, tx, "SELECT path, size, mtime_ticks, sha256, strikes, reason, quarantined_at FROM decode_attempts WHERE quarantined_at IS NOT NULL ORDER BY path");
        using var reader = cmd.ExecuteReader();
        var list = new List<QuarantineEntry>();
        while (reader.Read())
        {
            list.Add(new QuarantineEntry(Identity(reader), reader.GetInt32(4), reader.IsDBNull(5) ? "" : reader.GetString(5), reader.GetFieldValue<DateTimeOffset>(6)));
        }
        return (IReadOnlyList<QuarantineEntry>)list;
    });

    /// <summary>This node's in-progress marks (left when it stopped mid-decode); clears them. Other nodes' marks stay.</summary>
    public IReadOnlyList<FileIdentity> TakeInterrupted() => InTransaction((db, tx) =>
    {
        using var cmd = Command(db, tx,
            "UPDATE decode_attempts SET in_progress_since=NULL, in_progress_node=NULL WHERE in_progress_node=@n RETURNING path, size, mtime_ticks, sha256");
        Add(cmd, "n", _node);
        using var reader = cmd.ExecuteReader();
        var list = new List<FileIdentity>();
        while (reader.Read())
        {
            list.Add(Identity(reader));
        }
        return (IReadOnlyList<FileIdentity>)[.. list.OrderBy(f => f.Path, StringComparer.Ordinal)];
    });

    public void Dispose() => _db.Dispose();

    /// <summary>The stored key of a path: relative to the watched root with '/' separators when under it, else the full path.</summary>
    private string Key(string path)
    {
        string rel = Path.GetRelativePath(_watchedRoot, path);
        return rel == ".." || rel.StartsWith(".." + Path.DirectorySeparatorChar, StringComparison.Ordinal) || Path.IsPathRooted(rel)
            ? path
            : rel.Replace(Path.DirectorySeparatorChar, '/');
    }

    private string PathOf(string key) =>
        key.StartsWith('/') || Path.IsPathRooted(key) ? key : Path.Combine(_watchedRoot, key.Replace('/', Path.DirectorySeparatorChar));

    private T InTransaction<T>(Func<DbConnection, DbTransaction, T> work) => _db.Use(db =>
    {
        using var tx = db.BeginTransaction();
        var result = work(db, tx);
        tx.Commit();
        return result;
    });

    /// <summary>Creates the row for this file state; a row for an older state of the path is replaced.</summary>
    private void Upsert(DbConnection db, DbTransaction tx, FileIdentity file)
    {
        ForgetIfChanged(db, tx, file);
        using var cmd = Command(db, tx, "INSERT INTO decode_attempts(path, size, mtime_ticks, sha256) VALUES(@p, @s, @m, @h) ON CONFLICT(path) DO NOTHING", file);
        cmd.ExecuteNonQuery();
    }

    private void ForgetIfChanged(DbConnection db, DbTransaction tx, FileIdentity file)
    {
        using var cmd = Command(db, tx, "DELETE FROM decode_attempts WHERE path=@p AND NOT (size=@s AND mtime_ticks=@m AND sha256=@h)", file);
        cmd.ExecuteNonQuery();
    }

    private DbCommand Command(DbConnection db, DbTransaction tx, string sql, FileIdentity? file = null)
    {
        var cmd = db.CreateCommand();
        cmd.Transaction = tx;
        cmd.CommandText = sql;
        if (file is not null)
        {
            Add(cmd, "p", Key(file.Path));
            if (sql.Contains("@s", StringComparison.Ordinal))
            {
                Add(cmd, "s", file.Size);
                Add(cmd, "m", file.LastWriteUtcTicks);
                Add(cmd, "h", file.Sha256);
            }
        }
        return cmd;
    }

    private static void Add(DbCommand cmd, string name, object value)
    {
        var p = cmd.CreateParameter();
        p.ParameterName = name;
        p.Value = value;
        cmd.Parameters.Add(p);
    }

    private FileIdentity Identity(DbDataReader r) => new(PathOf(r.GetString(0)), r.GetInt64(1), r.GetInt64(2), r.GetString(3));
}
