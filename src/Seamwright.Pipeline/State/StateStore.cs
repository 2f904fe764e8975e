using System.Globalization;
using Microsoft.Data.Sqlite;

namespace Seamwright.Pipeline.State;

/// <summary>
/// The durable ledger of one output root: files seen, sets, runs, pair results and failures, in an
/// embedded SQLite database (write-ahead log, full sync) under <c>.seamwright/state.db</c>.
/// Thread-safe: every call takes the store's lock (SQLite connections are not shared across threads).
/// </summary>
public sealed class StateStore : IDisposable
{
    public const string StateFolder = ".seamwright";
    public const string DatabaseName = "state.db";

    private readonly SqliteConnection _db;
    private readonly object _gate = new();

    private StateStore(SqliteConnection db, string path)
    {
        _db = db;
        DatabasePath = path;
    }

    public string DatabasePath { get; }

    /// <summary>Opens (creating or migrating) the ledger of <paramref name="outputRoot"/>.</summary>
    public static StateStore Open(string outputRoot, bool readOnly = false)
    {
        string dir = Path.Combine(outputRoot, StateFolder);
        string path = Path.Combine(dir, DatabaseName);
        if (readOnly && !File.Exists(path))
        {
            throw new FileNotFoundException("No Seamwright state under " + outputRoot, path);
        }
        Directory.CreateDirectory(dir);
        var csb = new SqliteConnectionStringBuilder
        {
            DataSource = path,
            Mode = readOnly ? SqliteOpenMode.ReadOnly : SqliteOpenMode.ReadWriteCreate,
            Pooling = false,
            DefaultTimeout = 30,
        };
        var db = new SqliteConnection(csb.ToString());
        db.Open();
        var store = new StateStore(db, path);
        if (!readOnly)
        {
            store.Exec("PRAGMA journal_mode=WAL; PRAGMA synchronous=FULL; PRAGMA busy_timeout=30000;");
            store.Migrate();
        }
        else
        {
            store.Exec("PRAGMA busy_timeout=30000;");
            int v = store.SchemaVersion();
            if (v > StateSchema.Version)
            {
                throw new InvalidOperationException($"State schema version {v} is newer than this build knows ({StateSchema.Version}).");
            }
            if (v == 0)
            {
                // Created but never initialised (the writer stopped before its first commit): no state yet.
                store.Dispose();
                throw new FileNotFoundException("No Seamwright state under " + outputRoot + " yet", path);
            }
        }
        return store;
    }

    public int SchemaVersion()
    {
        lock (_gate)
        {
            using var cmd = _db.CreateCommand();
            cmd.CommandText = "SELECT name FROM sqlite_master WHERE type='table' AND name='meta'";
            if (cmd.ExecuteScalar() is null)
            {
                return 0;
            }
            cmd.CommandText = "SELECT value FROM meta WHERE key='schema_version'";
            return cmd.ExecuteScalar() is string s ? int.Parse(s, CultureInfo.InvariantCulture) : 0;
        }
    }

    private void Migrate()
    {
        int v = SchemaVersion();
        if (v > StateSchema.Version)
        {
            throw new InvalidOperationException($"State schema version {v} is newer than this build knows ({StateSchema.Version}); use a newer Seamwright.");
        }
        if (v == StateSchema.Version)
        {
            return;
        }
        lock (_gate)
        {
            using var tx = _db.BeginTransaction();
            using var cmd = _db.CreateCommand();
            cmd.Transaction = tx;
            cmd.CommandText = StateSchema.V1;
            cmd.ExecuteNonQuery();
            // Future versions: "if (v < 2) { ALTER TABLE ... }" here, one step per version.
            cmd.CommandText = "INSERT OR REPLACE INTO meta(key, value) VALUES('schema_version', $v)";
            cmd.Parameters.AddWithValue("$v", StateSchema.Version.ToString(CultureInfo.InvariantCulture));
            cmd.ExecuteNonQuery();
            tx.Commit();
        }
    }

    /// <summary>Runs left "running" by a crash become "abandoned"; their sets go back to pending. Returns the sets.</summary>
    public IReadOnlyList<string> RecoverInterrupted()
    {
        lock (_gate)
        {
            var sets = Query("SELECT DISTINCT set_id FROM runs WHERE state='running'", r => r.GetString(0));
            using var tx = _db.BeginTransaction();
            Exec("UPDATE runs SET state='abandoned' WHERE state='running'", tx);
            Exec("UPDATE sets SET state='pending' WHERE state='running'", tx);
            tx.Commit();
            return sets;
        }
    }

    // ---- files ----

    /// <summary>Records a file as seen (insert or update size and time); returns true when it is new or changed.</summary>
    public bool ObserveFile(string path, string setId, long size, long mtimeTicks)
    {
        lock (_gate)
        {
            using var cmd = _db.CreateCommand();
            cmd.CommandText = "SELECT size, mtime, state FROM files WHERE path=$p";
            cmd.Parameters.AddWithValue("$p", path);
            using (var r = cmd.ExecuteReader())
            {
                if (r.Read() && r.GetInt64(0) == size && r.GetInt64(1) == mtimeTicks && r.GetString(2) != "removed")
                {
                    return false;
                }
            }
            cmd.CommandText =
                """
                INSERT INTO files(path, set_id, size, mtime, state, first_seen) VALUES($p, $s, $z, $m, 'seen', $t)
                ON CONFLICT(path) DO UPDATE SET set_id=$s, size=$z, mtime=$m, state='seen', reason=NULL, hash=NULL
                """;
            cmd.Parameters.AddWithValue("$s", setId);
            cmd.Parameters.AddWithValue("$z", size);
            cmd.Parameters.AddWithValue("$m", mtimeTicks);
            cmd.Parameters.AddWithValue("$t", DateTime.UtcNow.Ticks);
            cmd.ExecuteNonQuery();
            return true;
        }
    }

    public void MarkFileRemoved(string path) =>
        Exec("UPDATE files SET state='removed' WHERE path=$p", ("$p", path));

    /// <summary>Records several observed files in one transaction; returns the paths that are new or changed.</summary>
    public IReadOnlyList<string> ObserveFiles(IEnumerable<(string Path, string SetId, long Size, long MtimeTicks)> files)
    {
        ArgumentNullException.ThrowIfNull(files);
        lock (_gate)
        {
            var changed = new List<string>();
            using var tx = _db.BeginTransaction();
            using var read = _db.CreateCommand();
            read.Transaction = tx;
            read.CommandText = "SELECT size, mtime, state FROM files WHERE path=$p";
            var rp = read.Parameters.Add("$p", SqliteType.Text);
            using var write = _db.CreateCommand();
            write.Transaction = tx;
            write.CommandText =
                """
                INSERT INTO files(path, set_id, size, mtime, state, first_seen) VALUES($p, $s, $z, $m, 'seen', $t)
                ON CONFLICT(path) DO UPDATE SET set_id=$s, size=$z, mtime=$m, state='seen', reason=NULL, hash=NULL
                """;
            var wp = write.Parameters.Add("$p", SqliteType.Text);
            var ws = write.Parameters.Add("$s", SqliteType.Text);
            var wz = write.Parameters.Add("$z", SqliteType.Integer);
            var wm = write.Parameters.Add("$m", SqliteType.Integer);
            write.Parameters.AddWithValue("$t", DateTime.UtcNow.Ticks);
            foreach (var f in files)
            {
                rp.Value = f.Path;
                bool same = false;
                using (var r = read.ExecuteReader())
                {
                    same = r.Read() && r.GetInt64(0) == f.Size && r.GetInt64(1) == f.MtimeTicks && r.GetString(2) != "removed";
                }
                if (same)
                {
                    continue;
                }
                wp.Value = f.Path; ws.Value = f.SetId; wz.Value = f.Size; wm.Value = f.MtimeTicks;
                write.ExecuteNonQuery();
                changed.Add(f.Path);
            }
            tx.Commit();
            return changed;
        }
    }

    public IReadOnlyList<FileRecord> Files(string? setId = null) =>
        Query(setId is null ? "SELECT * FROM files ORDER BY path" : "SELECT * FROM files WHERE set_id=$s ORDER BY path",
            r => new FileRecord(r.GetString(0), r.GetString(1), r.GetInt64(2), r.GetInt64(3), r.IsDBNull(4) ? null : r.GetString(4),
                r.GetString(5), r.IsDBNull(6) ? null : r.GetString(6), r.GetInt32(7), r.IsDBNull(9) ? null : r.GetInt64(9)),
            setId is null ? [] : [("$s", setId)]);

    // ---- sets ----

    public SetRecord? GetSet(string setId) =>
        Query("SELECT * FROM sets WHERE set_id=$s", ReadSet, ("$s", setId)).FirstOrDefault();

    public IReadOnlyList<SetRecord> Sets() => Query("SELECT * FROM sets ORDER BY set_id", ReadSet);

    /// <summary>Sets a set's state (creating the row when needed) without touching its last finished run.</summary>
    public void SetState(string setId, string state, string profile, string? reason = null) =>
        Exec(
            """
            INSERT INTO sets(set_id, state, profile, reason, first_seen, updated) VALUES($s, $st, $p, $why, $t, $t)
            ON CONFLICT(set_id) DO UPDATE SET state=$st, profile=$p, reason=$why, updated=$t
            """,
            ("$s", setId), ("$st", state), ("$p", profile), ("$why", (object?)reason ?? DBNull.Value), ("$t", DateTime.UtcNow.Ticks));

    private static SetRecord ReadSet(SqliteDataReader r) => new(
        r.GetString(0), r.GetString(1), r.GetString(2), r.IsDBNull(3) ? null : r.GetString(3), r.IsDBNull(4) ? null : r.GetString(4),
        r.IsDBNull(5) ? null : r.GetInt64(5), r.GetInt64(6) != 0, r.IsDBNull(7) ? null : r.GetString(7),
        new DateTime(r.GetInt64(8), DateTimeKind.Utc), new DateTime(r.GetInt64(9), DateTimeKind.Utc));

    // ---- runs ----

    public long BeginRun(string setId, string profile, string fingerprint, string toolVersion)
    {
        lock (_gate)
        {
            using var tx = _db.BeginTransaction();
            using var cmd = _db.CreateCommand();
            cmd.Transaction = tx;
            cmd.CommandText = "INSERT INTO runs(set_id, state, fingerprint, tool_version, started) VALUES($s, 'running', $f, $v, $t); SELECT last_insert_rowid();";
            cmd.Parameters.AddWithValue("$s", setId);
            cmd.Parameters.AddWithValue("$f", fingerprint);
            cmd.Parameters.AddWithValue("$v", toolVersion);
            cmd.Parameters.AddWithValue("$t", DateTime.UtcNow.Ticks);
            long id = (long)cmd.ExecuteScalar()!;
            cmd.Parameters.Clear();
            cmd.CommandText =
                """
                INSERT INTO sets(set_id, state, profile, first_seen, updated) VALUES($s, 'running', $p, $t, $t)
                ON CONFLICT(set_id) DO UPDATE SET state='running', profile=$p, reason=NULL, updated=$t
                """;
            cmd.Parameters.AddWithValue("$s", setId);
            cmd.Parameters.AddWithValue("$p", profile);
            cmd.Parameters.AddWithValue("$t", DateTime.UtcNow.Ticks);
            cmd.ExecuteNonQuery();
            tx.Commit();
            return id;
        }
    }

    /// <summary>Records a finished run, its pair results, and the set as done with the run's fingerprint and inputs digest.</summary>
    public void FinishRun(long runId, string setId, string fingerprint, string inputs, RunSummary summary,
        IReadOnlyList<PairResultRecord> pairs, IReadOnlyList<FileOutcome> files)
    {
        ArgumentNullException.ThrowIfNull(summary);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(files);
        lock (_gate)
        {
            using var tx = _db.BeginTransaction();
            using var cmd = _db.CreateCommand();
            cmd.Transaction = tx;
            long at = DateTime.UtcNow.Ticks;
            foreach (var f in files)
            {
                cmd.Parameters.Clear();
                cmd.CommandText =
                    """
                    INSERT INTO files(path, set_id, size, mtime, hash, state, reason, analyses, first_seen, last_run)
                    VALUES($p, $s, $z, $m, $h, $st, $why, $d, $t, $r)
                    ON CONFLICT(path) DO UPDATE SET set_id=$s, size=$z, mtime=$m, hash=$h, state=$st, reason=$why, analyses=analyses+$d, last_run=$r
                    """;
                cmd.Parameters.AddWithValue("$p", f.Path);
                cmd.Parameters.AddWithValue("$s", setId);
                cmd.Parameters.AddWithValue("$z", f.Size);
                cmd.Parameters.AddWithValue("$m", f.MtimeTicks);
                cmd.Parameters.AddWithValue("$h", (object?)f.Hash ?? DBNull.Value);
                cmd.Parameters.AddWithValue("$st", f.BadReason is null ? "analysed" : "bad");
                cmd.Parameters.AddWithValue("$why", (object?)f.BadReason ?? DBNull.Value);
                cmd.Parameters.AddWithValue("$d", f.Decoded ? 1 : 0);
                cmd.Parameters.AddWithValue("$t", at);
                cmd.Parameters.AddWithValue("$r", runId);
                cmd.ExecuteNonQuery();
                if (f.BadReason is not null)
                {
                    cmd.CommandText = "INSERT INTO failures(run_id, set_id, path, reason, at) VALUES($r, $s, $p, $why, $t)";
                    cmd.ExecuteNonQuery();
                }
            }
            cmd.Parameters.Clear();
            cmd.CommandText = "UPDATE files SET state='removed' WHERE set_id=$s AND state!='removed' AND last_run IS NOT NULL AND last_run!=$r";
            cmd.Parameters.AddWithValue("$s", setId);
            cmd.Parameters.AddWithValue("$r", runId);
            cmd.ExecuteNonQuery();
            cmd.Parameters.Clear();
            cmd.CommandText = "INSERT OR REPLACE INTO pair_results VALUES($r, $s, $a, $b, $st, $i, $m, $why)";
            cmd.CommandText = "INSERT OR REPLACE INTO pair_results VALUES($r, $s, $a, $b, $st, $i, $m, $why)";
            var pr = cmd.Parameters.Add("$r", SqliteType.Integer);
            var ps = cmd.Parameters.Add("$s", SqliteType.Text);
            var pa = cmd.Parameters.Add("$a", SqliteType.Text);
            var pb = cmd.Parameters.Add("$b", SqliteType.Text);
            var pst = cmd.Parameters.Add("$st", SqliteType.Text);
            var pi = cmd.Parameters.Add("$i", SqliteType.Integer);
            var pm = cmd.Parameters.Add("$m", SqliteType.Integer);
            var pw = cmd.Parameters.Add("$why", SqliteType.Text);
            foreach (var p in pairs)
            {
                pr.Value = runId; ps.Value = setId; pa.Value = p.ImageA; pb.Value = p.ImageB; pst.Value = p.Status;
                pi.Value = p.Inliers; pm.Value = p.Matches; pw.Value = p.Reasons;
                cmd.ExecuteNonQuery();
            }
            cmd.Parameters.Clear();
            long now = DateTime.UtcNow.Ticks;
            cmd.CommandText =
                """
                UPDATE runs SET state='done', finished=$t, images=$im, bad_files=$bf, pairs=$np, accepted=$ac, weak=$wk, rejected=$rj, incomplete=$inc WHERE run_id=$r;
                UPDATE sets SET state='done', fingerprint=$f, inputs=$in, done_run=$r, incomplete=$inc, reason=NULL, updated=$t WHERE set_id=$s;
                """;
            cmd.Parameters.AddWithValue("$t", now);
            cmd.Parameters.AddWithValue("$im", summary.Images);
            cmd.Parameters.AddWithValue("$bf", summary.BadFiles);
            cmd.Parameters.AddWithValue("$np", summary.Pairs);
            cmd.Parameters.AddWithValue("$ac", summary.Accepted);
            cmd.Parameters.AddWithValue("$wk", summary.Weak);
            cmd.Parameters.AddWithValue("$rj", summary.Rejected);
            cmd.Parameters.AddWithValue("$inc", summary.Incomplete ? 1 : 0);
            cmd.Parameters.AddWithValue("$r", runId);
            cmd.Parameters.AddWithValue("$f", fingerprint);
            cmd.Parameters.AddWithValue("$in", inputs);
            cmd.Parameters.AddWithValue("$s", setId);
            cmd.ExecuteNonQuery();
            tx.Commit();
        }
    }

    /// <summary>Marks a run abandoned (its set changed under it, or it failed) and records the set's new state.</summary>
    public void AbandonRun(long runId, string setId, string setState, string profile, string reason)
    {
        Exec("UPDATE runs SET state='abandoned', finished=$t WHERE run_id=$r", ("$r", runId), ("$t", DateTime.UtcNow.Ticks));
        SetState(setId, setState, profile, reason);
    }

    public IReadOnlyList<RunRecord> Runs(string? setId = null) =>
        Query(setId is null ? "SELECT * FROM runs ORDER BY run_id" : "SELECT * FROM runs WHERE set_id=$s ORDER BY run_id", ReadRun,
            setId is null ? [] : [("$s", setId)]);

    public RunRecord? GetRun(long runId) => Query("SELECT * FROM runs WHERE run_id=$r", ReadRun, ("$r", runId)).FirstOrDefault();

    private static RunRecord ReadRun(SqliteDataReader r) => new(
        r.GetInt64(0), r.GetString(1), r.GetString(2), r.GetString(3), r.GetString(4), new DateTime(r.GetInt64(5), DateTimeKind.Utc),
        r.IsDBNull(6) ? null : new DateTime(r.GetInt64(6), DateTimeKind.Utc),
        r.IsDBNull(7) ? null : new RunSummary(r.GetInt32(7), r.GetInt32(8), r.GetInt32(9), r.GetInt32(10), r.GetInt32(11), r.GetInt32(12), r.GetInt64(13) != 0));

    public IReadOnlyList<PairResultRecord> PairResults(long runId) =>
        Query("SELECT image_a, image_b, status, inliers, matches, reasons FROM pair_results WHERE run_id=$r ORDER BY image_a, image_b",
            r => new PairResultRecord(r.GetString(0), r.GetString(1), r.GetString(2), r.GetInt32(3), r.GetInt32(4), r.GetString(5)), ("$r", runId));

    /// <summary>
    /// When a run started. For a run whose rows were pruned: the start of the next run still in the
    /// ledger (run ids grow with time, so the pruned run started no later). Null when neither exists.
    /// </summary>
    public DateTime? RunStartedUtc(long runId) =>
        Query("SELECT started FROM runs WHERE run_id >= $r ORDER BY run_id LIMIT 1", r => (DateTime?)new DateTime(r.GetInt64(0), DateTimeKind.Utc), ("$r", runId))
            .FirstOrDefault();

    /// <summary>
    /// Deletes the rows (run, pair results, failures) of superseded runs: per set, every finished
    /// or abandoned run beyond the newest <paramref name="keepOld"/> + 1. A running run and the
    /// set's current (done) run are never deleted. Returns the deleted run ids per set.
    /// </summary>
    public IReadOnlyList<(string SetId, IReadOnlyList<long> Runs)> PruneRuns(int keepOld)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(keepOld);
        lock (_gate)
        {
            var victims = new List<(string SetId, long Run)>();
            using (var cmd = _db.CreateCommand())
            {
                cmd.CommandText =
                    """
                    SELECT r.set_id, r.run_id FROM runs r LEFT JOIN sets s ON s.set_id = r.set_id
                    WHERE r.state != 'running' AND (s.done_run IS NULL OR s.done_run != r.run_id)
                      AND (SELECT COUNT(*) FROM runs n WHERE n.set_id = r.set_id AND n.run_id > r.run_id) > $k
                    ORDER BY r.set_id, r.run_id
                    """;
                cmd.Parameters.AddWithValue("$k", keepOld);
                using var rd = cmd.ExecuteReader();
                while (rd.Read())
                {
                    victims.Add((rd.GetString(0), rd.GetInt64(1)));
                }
            }
            if (victims.Count == 0)
            {
                return [];
            }
            using var tx = _db.BeginTransaction();
            using (var del = _db.CreateCommand())
            {
                del.Transaction = tx;
                del.CommandText = "DELETE FROM pair_results WHERE run_id=$r; DELETE FROM failures WHERE run_id=$r; DELETE FROM runs WHERE run_id=$r;";
                var pr = del.Parameters.Add("$r", SqliteType.Integer);
                foreach (var (_, run) in victims)
                {
                    pr.Value = run;
                    del.ExecuteNonQuery();
                }
            }
            tx.Commit();
            return victims.GroupBy(v => v.SetId, StringComparer.Ordinal)
                .Select(g => (g.Key, (IReadOnlyList<long>)g.Select(v => v.Run).ToList())).ToList();
        }
    }

    // ---- failures ----

    public void RecordFailure(long? runId, string setId, string path, string reason) =>
        Exec("INSERT INTO failures(run_id, set_id, path, reason, at) VALUES($r, $s, $p, $why, $t)",
            ("$r", (object?)runId ?? DBNull.Value), ("$s", setId), ("$p", path), ("$why", reason), ("$t", DateTime.UtcNow.Ticks));

    public IReadOnlyList<FailureRecord> Failures(string? setId = null) =>
        Query(setId is null ? "SELECT run_id, set_id, path, reason, at FROM failures ORDER BY id" : "SELECT run_id, set_id, path, reason, at FROM failures WHERE set_id=$s ORDER BY id",
            r => new FailureRecord(r.IsDBNull(0) ? null : r.GetInt64(0), r.GetString(1), r.GetString(2), r.GetString(3), new DateTime(r.GetInt64(4), DateTimeKind.Utc)),
            setId is null ? [] : [("$s", setId)]);

    // ---- plumbing ----

    private void Exec(string sql, params (string Name, object Value)[] args) => Exec(sql, null, args);

    private void Exec(string sql, SqliteTransaction? tx, params (string Name, object Value)[] args)
    {
        lock (_gate)
        {
            using var cmd = _db.CreateCommand();
            cmd.Transaction = tx;
            cmd.CommandText = sql;
            foreach (var (n, v) in args)
            {
                cmd.Parameters.AddWithValue(n, v);
            }
            cmd.ExecuteNonQuery();
        }
    }

    private List<T> Query<T>(string sql, Func<SqliteDataReader, T> read, params (string Name, object Value)[] args)
    {
        lock (_gate)
        {
            using var cmd = _db.CreateCommand();
            cmd.CommandText = sql;
            foreach (var (n, v) in args)
            {
                cmd.Parameters.AddWithValue(n, v);
            }
            using var r = cmd.ExecuteReader();
            var list = new List<T>();
            while (r.Read())
            {
                list.Add(read(r));
            }
            return list;
        }
    }

    public void Dispose() => _db.Dispose();
}
