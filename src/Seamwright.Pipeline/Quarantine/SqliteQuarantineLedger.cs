using System.Globalization;
using Microsoft.Data.Sqlite;

namespace Seamwright.Pipeline.Quarantine;

/// <summary>
/// <see cref="IQuarantineLedger"/> in one table (decode_attempts) of a SQLite database, so strikes
/// and quarantines survive restarts. It can share the service's state database file: the table
/// name is its own and it is created if missing. One connection, serialised by a lock.
/// </summary>
public sealed class SqliteQuarantineLedger : IQuarantineLedger, IDisposable
{
    private readonly SqliteConnection _connection;
    private readonly Lock _gate = new();

    public SqliteQuarantineLedger(string databasePath)
    {
        _connection = new SqliteConnection(new SqliteConnectionStringBuilder { DataSource = databasePath, Pooling = false }.ToString());
        _connection.Open();
        Execute("PRAGMA journal_mode=WAL; PRAGMA synchronous=FULL; PRAGMA busy_timeout=5000;");
        Execute(
            """
            CREATE TABLE IF NOT EXISTS decode_attempts (
              path TEXT PRIMARY KEY,
              size INTEGER NOT NULL,
              mtime_ticks INTEGER NOT NULL,
              sha256 TEXT NOT NULL,
              strikes INTEGER NOT NULL DEFAULT 0,
              reason TEXT,
              in_progress_since TEXT,
              quarantined_at TEXT
            );
            """);
    }

    public QuarantineEntry? FindQuarantined(FileIdentity file)
    {
        lock (_gate)
        {
            using var cmd = Command("SELECT strikes, reason, quarantined_at FROM decode_attempts WHERE path=$p AND quarantined_at IS NOT NULL", file);
            ForgetIfChanged(file);
            using var reader = cmd.ExecuteReader();
            return reader.Read()
                ? new QuarantineEntry(file, reader.GetInt32(0), reader.IsDBNull(1) ? "" : reader.GetString(1), ParseTime(reader.GetString(2)))
                : null;
        }
    }

    public void MarkInProgress(FileIdentity file, DateTimeOffset at)
    {
        lock (_gate)
        {
            Upsert(file);
            using var cmd = Command("UPDATE decode_attempts SET in_progress_since=$t WHERE path=$p", file);
            cmd.Parameters.AddWithValue("$t", FormatTime(at));
            cmd.ExecuteNonQuery();
        }
    }

    public void ClearInProgress(FileIdentity file)
    {
        lock (_gate)
        {
            using var cmd = Command("UPDATE decode_attempts SET in_progress_since=NULL WHERE path=$p", file);
            cmd.ExecuteNonQuery();
        }
    }

    public int AddStrike(FileIdentity file, string reason, DateTimeOffset at)
    {
        lock (_gate)
        {
            Upsert(file);
            using var cmd = Command("UPDATE decode_attempts SET strikes=strikes+1, reason=$r WHERE path=$p RETURNING strikes", file);
            cmd.Parameters.AddWithValue("$r", reason);
            return Convert.ToInt32(cmd.ExecuteScalar(), CultureInfo.InvariantCulture);
        }
    }

    public void Quarantine(FileIdentity file, string reason, DateTimeOffset at)
    {
        lock (_gate)
        {
            Upsert(file);
            using var cmd = Command("UPDATE decode_attempts SET reason=$r, quarantined_at=$t WHERE path=$p", file);
            cmd.Parameters.AddWithValue("$r", reason);
            cmd.Parameters.AddWithValue("$t", FormatTime(at));
            cmd.ExecuteNonQuery();
        }
    }

    public IReadOnlyList<QuarantineEntry> ListQuarantined()
    {
        lock (_gate)
        {
            using var cmd = _connection.CreateCommand();
            cmd.CommandText = "SELECT path, size, mtime_ticks, sha256, strikes, reason, quarantined_at FROM decode_attempts WHERE quarantined_at IS NOT NULL ORDER BY path";
            using var reader = cmd.ExecuteReader();
            var list = new List<QuarantineEntry>();
            while (reader.Read())
            {
                list.Add(new QuarantineEntry(Identity(reader), reader.GetInt32(4), reader.IsDBNull(5) ? "" : reader.GetString(5), ParseTime(reader.GetString(6))));
            }
            return list;
        }
    }

    public IReadOnlyList<FileIdentity> TakeInterrupted()
    {
        lock (_gate)
        {
            using var tx = _connection.BeginTransaction();
            var list = new List<FileIdentity>();
            using (var cmd = _connection.CreateCommand())
            {
                cmd.Transaction = tx;
                cmd.CommandText = "SELECT path, size, mtime_ticks, sha256 FROM decode_attempts WHERE in_progress_since IS NOT NULL ORDER BY path";
                using var reader = cmd.ExecuteReader();
                while (reader.Read())
                {
                    list.Add(Identity(reader));
                }
            }
            using (var clear = _connection.CreateCommand())
            {
                clear.Transaction = tx;
                clear.CommandText = "UPDATE decode_attempts SET in_progress_since=NULL WHERE in_progress_since IS NOT NULL";
                clear.ExecuteNonQuery();
            }
            tx.Commit();
            return list;
        }
    }

    public void Dispose() => _connection.Dispose();

    /// <summary>Creates the row for this file state; a row for an older state of the path is replaced.</summary>
    private void Upsert(FileIdentity file)
    {
        ForgetIfChanged(file);
        using var cmd = Command("INSERT INTO decode_attempts(path, size, mtime_ticks, sha256) VALUES($p, $s, $m, $h) ON CONFLICT(path) DO NOTHING", file);
        cmd.ExecuteNonQuery();
    }

    private void ForgetIfChanged(FileIdentity file)
    {
        using var cmd = Command("DELETE FROM decode_attempts WHERE path=$p AND NOT (size=$s AND mtime_ticks=$m AND sha256=$h)", file);
        cmd.ExecuteNonQuery();
    }

    private SqliteCommand Command(string sql, FileIdentity file)
    {
        var cmd = _connection.CreateCommand();
        cmd.CommandText = sql;
        cmd.Parameters.AddWithValue("$p", file.Path);
        if (sql.Contains("$s", StringComparison.Ordinal))
        {
            cmd.Parameters.AddWithValue("$s", file.Size);
            cmd.Parameters.AddWithValue("$m", file.LastWriteUtcTicks);
            cmd.Parameters.AddWithValue("$h", file.Sha256);
        }
        return cmd;
    }

    private void Execute(string sql)
    {
        using var cmd = _connection.CreateCommand();
        cmd.CommandText = sql;
        cmd.ExecuteNonQuery();
    }

    private static FileIdentity Identity(SqliteDataReader r) => new(r.GetString(0), r.GetInt64(1), r.GetInt64(2), r.GetString(3));

    private static string FormatTime(DateTimeOffset t) => t.UtcDateTime.ToString("O", CultureInfo.InvariantCulture);

    private static DateTimeOffset ParseTime(string s) => DateTimeOffset.Parse(s, CultureInfo.InvariantCulture, DateTimeStyles.AssumeUniversal);
}
