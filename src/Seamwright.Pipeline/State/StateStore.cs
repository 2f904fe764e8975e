using System.Data.Common;
using System.Globalization;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.State;

/// <summary>
/// The durable ledger of one output root: files seen, sets, runs, pair results, failures, and (for
/// several nodes) claims and node heartbeats. Either an embedded SQLite database under
/// <c>.seamwright/state.db</c> (the default, one process per output root) or a schema of a shared
/// PostgreSQL database (<see cref="StateSettings"/>). Thread-safe: SQLite calls are serialised on
/// one connection; PostgreSQL calls each take a pooled connection.
/// </summary>
public sealed partial class StateStore : IDisposable
{
    public const string StateFolder = ".seamwright";
    public const string DatabaseName = "state.db";

    private readonly LedgerDialect _ledger;

    private StateStore(LedgerDialect ledger) => _ledger = ledger;

    /// <summary>Where the ledger lives (a file path, or the PostgreSQL host, database and schema).</summary>
    public string DatabasePath => _ledger.Location;

    /// <summary>"Sqlite" or "PostgreSql".</summary>
    public string Provider => _ledger.Name;

    /// <summary>True when several processes may share this ledger (claims and leases apply).</summary>
    public bool IsShared => _ledger is PostgreSqlLedger;

    /// <summary>Opens (creating or migrating) the SQLite ledger of <paramref name="outputRoot"/>.</summary>
    public static StateStore Open(string outputRoot, bool readOnly = false) => Open(outputRoot, null, readOnly);

    /// <summary>Opens (creating or migrating) the ledger of <paramref name="outputRoot"/> with the configured provider.</summary>
    public static StateStore Open(string outputRoot, StateSettings? settings, bool readOnly = false)
    {
        LedgerDialect ledger = StateProviders.IsPostgreSql(settings?.Provider)
            ? OpenPostgreSql(outputRoot, settings!, readOnly)
            : OpenSqlite(outputRoot, readOnly);
        var store = new StateStore(ledger);
        try
        {
            if (readOnly)
            {
                store.CheckReadable(outputRoot);
            }
            else
            {
                store.Migrate();
            }
            return store;
        }
        catch
        {
            store.Dispose();
            throw;
        }
    }

    private static SqliteLedger OpenSqlite(string outputRoot, bool readOnly)
    {
        string dir = Path.Combine(outputRoot, StateFolder);
        string path = Path.Combine(dir, DatabaseName);
        if (readOnly && !File.Exists(path))
        {
            throw new FileNotFoundException("No Seamwright state under " + outputRoot, path);
        }
        Directory.CreateDirectory(dir);
        return new SqliteLedger(path, readOnly);
    }

    private static PostgreSqlLedger OpenPostgreSql(string outputRoot, StateSettings settings, bool readOnly)
    {
        if (string.IsNullOrWhiteSpace(settings.ConnectionString))
        {
            throw new InvalidOperationException("Seamwright:State:ConnectionString is empty; the PostgreSql provider needs one.");
        }
        string? id = RootIdentity.Get(outputRoot, create: !readOnly)
            ?? throw new FileNotFoundException("No Seamwright state under " + outputRoot + " (no root identity file)", RootIdentity.PathOf(outputRoot));
        return new PostgreSqlLedger(settings.ConnectionString, RootIdentity.SchemaFor(id), settings.CommandTimeoutSeconds);
    }

    private void CheckReadable(string outputRoot)
    {
        int v = SchemaVersion();
        if (v > StateSchema.Version)
        {
            throw new InvalidOperationException($"State schema version {v} is newer than this build knows ({StateSchema.Version}).");
        }
        if (v == 0)
        {
            // Created but never initialised (the writer stopped before its first commit): no state yet.
            throw new FileNotFoundException("No Seamwright state under " + outputRoot + " yet", DatabasePath);
        }
    }

    public int SchemaVersion() => _ledger.Use(db => _ledger.StoredVersion(db));

    private void Migrate() => _ledger.Use(db =>
    {
        using var tx = db.BeginTransaction();
        _ledger.BeforeMigration(db, tx);
        int v = _ledger.StoredVersion(db, tx);
        if (v > StateSchema.Version)
        {
            throw new InvalidOperationException($"State schema version {v} is newer than this build knows ({StateSchema.Version}); use a newer Seamwright.");
        }
        if (v == StateSchema.Version)
        {
            return 0;
        }
        using var cmd = db.CreateCommand();
        cmd.Transaction = tx;
        for (int step = v; step < StateSchema.Version; step++)
        {
            cmd.CommandText = _ledger.Ddl(StateSchema.Steps[step]);
            cmd.ExecuteNonQuery();
        }
        cmd.CommandText = "INSERT INTO meta(key, value) VALUES('schema_version', @v) ON CONFLICT(key) DO UPDATE SET value=excluded.value";
        Add(cmd, "v", StateSchema.Version.ToString(CultureInfo.InvariantCulture));
        cmd.ExecuteNonQuery();
        tx.Commit();
        return 0;
    });

    /// <summary>
    /// Runs left "running" by a crash become "abandoned"; their sets go back to pending. Returns the
    /// sets. On a shared ledger only this node's runs (<paramref name="node"/>): other nodes' runs
    /// are theirs until their lease runs out (<see cref="TryClaim"/> takes them over then).
    /// </summary>
    public IReadOnlyList<string> RecoverInterrupted(string? node = null) => _ledger.Use(db =>
    {
        string mine = IsShared ? " AND node=@n" : "";
        var args = IsShared ? new (string, object?)[] { ("n", node ?? "") } : [];
        using var tx = db.BeginTransaction();
        var sets = Query(db, tx, "SELECT DISTINCT set_id FROM runs WHERE state='running'" + mine + " ORDER BY set_id", r => r.GetString(0), args);
        Exec(db, tx, "UPDATE sets SET state='pending' WHERE state='running' AND set_id IN (SELECT set_id FROM runs WHERE state='running'" + mine + ")", args);
        Exec(db, tx, "UPDATE runs SET state='abandoned' WHERE state='running'" + mine, args);
        if (IsShared)
        {
            Exec(db, tx, "UPDATE claims SET node=NULL, lease_until=0 WHERE node=@n", args);
        }
        tx.Commit();
        return (IReadOnlyList<string>)sets;
    });

    // ---- files ----

    private const string UpsertSeenFile =
        """
        INSERT INTO files(path, set_id, size, mtime, state, first_seen) VALUES(@p, @s, @z, @m, 'seen', @t)
        ON CONFLICT(path) DO UPDATE SET set_id=@s, size=@z, mtime=@m, state='seen', reason=NULL, hash=NULL
        """;

    /// <summary>Records a file as seen (insert or update size and time); returns true when it is new or changed.</summary>
    public bool ObserveFile(string path, string setId, long size, long mtimeTicks) =>
        ObserveFiles([(path, setId, size, mtimeTicks)]).Count == 1;

    public void MarkFileRemoved(string path) =>
        Exec("UPDATE files SET state='removed' WHERE path=@p", ("p", path));

    /// <summary>Records several observed files in one transaction; returns the paths that are new or changed.</summary>
    public IReadOnlyList<string> ObserveFiles(IEnumerable<(string Path, string SetId, long Size, long MtimeTicks)> files)
    {
        ArgumentNullException.ThrowIfNull(files);
        return _ledger.Use(db =>
        {
            var changed = new List<string>();
            using var tx = db.BeginTransaction();
            long now = DateTime.UtcNow.Ticks;
            foreach (var f in files)
            {
                bool same = Query(db, tx, "SELECT size, mtime, state FROM files WHERE path=@p",
                    r => L(r, 0) == f.Size && L(r, 1) == f.MtimeTicks && r.GetString(2) != "removed", ("p", f.Path)).FirstOrDefault();
                if (same)
                {
                    continue;
                }
                Exec(db, tx, UpsertSeenFile, ("p", f.Path), ("s", f.SetId), ("z", f.Size), ("m", f.MtimeTicks), ("t", now));
                changed.Add(f.Path);
            }
            tx.Commit();
            return (IReadOnlyList<string>)changed;
        });
    }

    public IReadOnlyList<FileRecord> Files(string? setId = null) =>
        Query(setId is null ? "SELECT * FROM files ORDER BY path" : "SELECT * FROM files WHERE set_id=@s ORDER BY path",
            r => new FileRecord(r.GetString(0), r.GetString(1), L(r, 2), L(r, 3), r.IsDBNull(4) ? null : r.GetString(4),
                r.GetString(5), r.IsDBNull(6) ? null : r.GetString(6), (int)L(r, 7), r.IsDBNull(9) ? null : L(r, 9)),
            setId is null ? [] : [("s", setId)]);

    // ---- sets ----

    public SetRecord? GetSet(string setId) =>
        Query("SELECT * FROM sets WHERE set_id=@s", ReadSet, ("s", setId)).FirstOrDefault();

    public IReadOnlyList<SetRecord> Sets() => Query("SELECT * FROM sets ORDER BY set_id", ReadSet);

    private const string UpsertSetState =
        """
        INSERT INTO sets(set_id, state, profile, reason, first_seen, updated) VALUES(@s, @st, @p, @why, @t, @t)
        ON CONFLICT(set_id) DO UPDATE SET state=@st, profile=@p, reason=@why, updated=@t
        """;

    /// <summary>Sets a set's state (creating the row when needed) without touching its last finished run.</summary>
    public void SetState(string setId, string state, string profile, string? reason = null) =>
        Exec(UpsertSetState, ("s", setId), ("st", state), ("p", profile), ("why", reason), ("t", DateTime.UtcNow.Ticks));

    /// <summary>Records a set as retired (its inputs gone, its outputs removed) and its files as removed, in one transaction.</summary>
    public void RetireSet(string setId, string profile, string reason) => _ledger.Use(db =>
    {
        using var tx = db.BeginTransaction();
        long now = DateTime.UtcNow.Ticks;
        Exec(db, tx, UpsertSetState, ("s", setId), ("st", SetStates.Retired), ("p", profile), ("why", reason), ("t", now));
        Exec(db, tx, "UPDATE files SET state='removed' WHERE set_id=@s AND state!='removed'", ("s", setId));
        tx.Commit();
        return 0;
    });

    private static SetRecord ReadSet(DbDataReader r) => new(
        r.GetString(0), r.GetString(1), r.GetString(2), r.IsDBNull(3) ? null : r.GetString(3), r.IsDBNull(4) ? null : r.GetString(4),
        r.IsDBNull(5) ? null : L(r, 5), L(r, 6) != 0, r.IsDBNull(7) ? null : r.GetString(7),
        new DateTime(L(r, 8), DateTimeKind.Utc), new DateTime(L(r, 9), DateTimeKind.Utc));

    // ---- runs ----

    /// <summary>Starts a run (made by <paramref name="node"/>, recorded on the run) and marks its set running.</summary>
    public long BeginRun(string setId, string profile, string fingerprint, string toolVersion, string? node = null) => _ledger.Use(db =>
    {
        using var tx = db.BeginTransaction();
        long now = DateTime.UtcNow.Ticks;
        long id = Query(db, tx, "INSERT INTO runs(set_id, state, fingerprint, tool_version, started, node) VALUES(@s, 'running', @f, @v, @t, @n) RETURNING run_id",
            r => L(r, 0), ("s", setId), ("f", fingerprint), ("v", toolVersion), ("t", now), ("n", node)).Single();
        Exec(db, tx,
            """
            INSERT INTO sets(set_id, state, profile, first_seen, updated) VALUES(@s, 'running', @p, @t, @t)
            ON CONFLICT(set_id) DO UPDATE SET state='running', profile=@p, reason=NULL, updated=@t
            """,
            ("s", setId), ("p", profile), ("t", now));
        if (IsShared)
        {
            Exec(db, tx, "UPDATE claims SET run_id=@r WHERE set_id=@s AND node=@n", ("r", id), ("s", setId), ("n", node));
        }
        tx.Commit();
        return id;
    });

    /// <summary>Records a finished run, its pair results, and the set as done with the run's fingerprint and inputs digest.</summary>
    public void FinishRun(long runId, string setId, string fingerprint, string inputs, RunSummary summary,
        IReadOnlyList<PairResultRecord> pairs, IReadOnlyList<FileOutcome> files)
    {
        ArgumentNullException.ThrowIfNull(summary);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(files);
        _ledger.Use(db =>
        {
            using var tx = db.BeginTransaction();
            long at = DateTime.UtcNow.Ticks;
            foreach (var f in files)
            {
                Exec(db, tx,
                    """
                    INSERT INTO files(path, set_id, size, mtime, hash, state, reason, analyses, first_seen, last_run)
                    VALUES(@p, @s, @z, @m, @h, @st, @why, @d, @t, @r)
                    ON CONFLICT(path) DO UPDATE SET set_id=@s, size=@z, mtime=@m, hash=@h, state=@st, reason=@why, analyses=files.analyses+@d, last_run=@r
                    """,
                    ("p", f.Path), ("s", setId), ("z", f.Size), ("m", f.MtimeTicks), ("h", f.Hash), ("st", f.BadReason is null ? "analysed" : "bad"),
                    ("why", f.BadReason), ("d", f.Decoded ? 1 : 0), ("t", at), ("r", runId));
                if (f.BadReason is not null)
                {
                    Exec(db, tx, "INSERT INTO failures(run_id, set_id, path, reason, at) VALUES(@r, @s, @p, @why, @t)",
                        ("r", runId), ("s", setId), ("p", f.Path), ("why", f.BadReason), ("t", at));
                }
            }
            Exec(db, tx, "UPDATE files SET state='removed' WHERE set_id=@s AND state!='removed' AND last_run IS NOT NULL AND last_run!=@r",
                ("s", setId), ("r", runId));
            foreach (var p in pairs)
            {
                Exec(db, tx,
                    """
                    INSERT INTO pair_results(run_id, set_id, image_a, image_b, status, inliers, matches, reasons) VALUES(@r, @s, @a, @b, @st, @i, @m, @why)
                    ON CONFLICT(run_id, image_a, image_b) DO UPDATE SET set_id=excluded.set_id, status=excluded.status, inliers=excluded.inliers,
                        matches=excluded.matches, reasons=excluded.reasons
                    """,
                    ("r", runId), ("s", setId), ("a", p.ImageA), ("b", p.ImageB), ("st", p.Status), ("i", p.Inliers), ("m", p.Matches), ("why", p.Reasons));
            }
            long now = DateTime.UtcNow.Ticks;
            Exec(db, tx,
                "UPDATE runs SET state='done', finished=@t, images=@im, bad_files=@bf, pairs=@np, accepted=@ac, weak=@wk, rejected=@rj, incomplete=@inc WHERE run_id=@r",
                ("t", now), ("im", summary.Images), ("bf", summary.BadFiles), ("np", summary.Pairs), ("ac", summary.Accepted), ("wk", summary.Weak),
                ("rj", summary.Rejected), ("inc", summary.Incomplete ? 1 : 0), ("r", runId));
            Exec(db, tx,
                "UPDATE sets SET state='done', fingerprint=@f, inputs=@in, done_run=@r, incomplete=@inc, reason=NULL, updated=@t WHERE set_id=@s",
                ("f", fingerprint), ("in", inputs), ("r", runId), ("inc", summary.Incomplete ? 1 : 0), ("t", now), ("s", setId));
            tx.Commit();
            return 0;
        });
    }

    /// <summary>Marks a run abandoned (its set changed under it, or it failed) and records the set's new state.</summary>
    public void AbandonRun(long runId, string setId, string setState, string profile, string reason)
    {
        Exec("UPDATE runs SET state='abandoned', finished=@t WHERE run_id=@r", ("r", runId), ("t", DateTime.UtcNow.Ticks));
        SetState(setId, setState, profile, reason);
    }

    /// <summary>The sets with a run in progress (state running), in order.</summary>
    public IReadOnlyList<string> RunningSets() =>
        Query("SELECT DISTINCT set_id FROM runs WHERE state='running' ORDER BY set_id", r => r.GetString(0));

    /// <summary>Marks a run abandoned and leaves its set alone (a node that lost its claim: the set is another node's now).</summary>
    public void AbandonRunOnly(long runId) =>
        Exec("UPDATE runs SET state='abandoned', finished=@t WHERE run_id=@r", ("r", runId), ("t", DateTime.UtcNow.Ticks));

    public IReadOnlyList<RunRecord> Runs(string? setId = null) =>
        Query(setId is null ? RunColumns + " ORDER BY run_id" : RunColumns + " WHERE set_id=@s ORDER BY run_id", ReadRun,
            setId is null ? [] : [("s", setId)]);

    public RunRecord? GetRun(long runId) => Query(RunColumns + " WHERE run_id=@r", ReadRun, ("r", runId)).FirstOrDefault();

    private const string RunColumns =
        "SELECT run_id, set_id, state, fingerprint, tool_version, started, finished, images, bad_files, pairs, accepted, weak, rejected, incomplete, node FROM runs";

    private static RunRecord ReadRun(DbDataReader r) => new(
        L(r, 0), r.GetString(1), r.GetString(2), r.GetString(3), r.GetString(4), new DateTime(L(r, 5), DateTimeKind.Utc),
        r.IsDBNull(6) ? null : new DateTime(L(r, 6), DateTimeKind.Utc),
        r.IsDBNull(7) ? null : new RunSummary((int)L(r, 7), (int)L(r, 8), (int)L(r, 9), (int)L(r, 10), (int)L(r, 11), (int)L(r, 12), L(r, 13) != 0))
    {
        Node = r.IsDBNull(14) ? null : r.GetString(14),
    };

    public IReadOnlyList<PairResultRecord> PairResults(long runId) =>
        Query("SELECT image_a, image_b, status, inliers, matches, reasons FROM pair_results WHERE run_id=@r ORDER BY image_a, image_b",
            r => new PairResultRecord(r.GetString(0), r.GetString(1), r.GetString(2), (int)L(r, 3), (int)L(r, 4), r.GetString(5)), ("r", runId));

    /// <summary>
    /// When a run started. For a run whose rows were pruned: the start of the next run still in the
    /// ledger (run ids grow with time, so the pruned run started no later). Null when neither exists.
    /// </summary>
    public DateTime? RunStartedUtc(long runId) =>
        Query("SELECT started FROM runs WHERE run_id >= @r ORDER BY run_id LIMIT 1", r => (DateTime?)new DateTime(L(r, 0), DateTimeKind.Utc), ("r", runId))
            .FirstOrDefault();

    /// <summary>
    /// Deletes the rows (run, pair results, failures) of superseded runs: per set, every finished
    /// or abandoned run beyond the newest <paramref name="keepOld"/> + 1. A running run and the
    /// set's current (done) run are never deleted. Returns the deleted run ids per set.
    /// </summary>
    public IReadOnlyList<(string SetId, IReadOnlyList<long> Runs)> PruneRuns(int keepOld)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(keepOld);
        return _ledger.Use(db =>
        {
            using var tx = db.BeginTransaction();
            var victims = Query(db, tx,
                """
                SELECT r.set_id, r.run_id FROM runs r LEFT JOIN sets s ON s.set_id = r.set_id
                WHERE r.state != 'running' AND (s.done_run IS NULL OR s.done_run != r.run_id)
                  AND (SELECT COUNT(*) FROM runs n WHERE n.set_id = r.set_id AND n.run_id > r.run_id) > @k
                ORDER BY r.set_id, r.run_id
                """,
                r => (SetId: r.GetString(0), Run: L(r, 1)), ("k", keepOld));
            foreach (var (_, run) in victims)
            {
                Exec(db, tx, "DELETE FROM pair_results WHERE run_id=@r", ("r", run));
                Exec(db, tx, "DELETE FROM failures WHERE run_id=@r", ("r", run));
                Exec(db, tx, "DELETE FROM runs WHERE run_id=@r", ("r", run));
            }
            tx.Commit();
            return (IReadOnlyList<(string, IReadOnlyList<long>)>)victims.GroupBy(v => v.SetId, StringComparer.Ordinal)
                .Select(g => (g.Key, (IReadOnlyList<long>)g.Select(v => v.Run).ToList())).ToList();
        });
    }

    // ---- failures ----

    public void RecordFailure(long? runId, string setId, string path, string reason) =>
        Exec("INSERT INTO failures(run_id, set_id, path, reason, at) VALUES(@r, @s, @p, @why, @t)",
            ("r", runId), ("s", setId), ("p", path), ("why", reason), ("t", DateTime.UtcNow.Ticks));

    public IReadOnlyList<FailureRecord> Failures(string? setId = null) =>
        Query(setId is null ? "SELECT run_id, set_id, path, reason, at FROM failures ORDER BY id" : "SELECT run_id, set_id, path, reason, at FROM failures WHERE set_id=@s ORDER BY id",
            r => new FailureRecord(r.IsDBNull(0) ? null : L(r, 0), r.GetString(1), r.GetString(2), r.GetString(3), new DateTime(L(r, 4), DateTimeKind.Utc)),
            setId is null ? [] : [("s", setId)]);

    // ---- plumbing ----

    /// <summary>A numeric column as a long, whatever integer width the database returns.</summary>
    private static long L(DbDataReader r, int i) => Convert.ToInt64(r.GetValue(i), CultureInfo.InvariantCulture);

    private static void Add(DbCommand cmd, string name, object? value)
    {
        var p = cmd.CreateParameter();
        p.ParameterName = name;
        p.Value = value ?? DBNull.Value;
        if (value is null)
        {
            p.DbType = System.Data.DbType.String; // a typed NULL (PostgreSQL must know the type of every parameter)
        }
        cmd.Parameters.Add(p);
    }

    private void Exec(string sql, params (string Name, object? Value)[] args) =>
        _ledger.Use(db => Exec(db, null, sql, args));

    private static int Exec(DbConnection db, DbTransaction? tx, string sql, params (string Name, object? Value)[] args)
    {
        using var cmd = db.CreateCommand();
        cmd.Transaction = tx;
        cmd.CommandText = sql;
        foreach (var (n, v) in args)
        {
            Add(cmd, n, v);
        }
        return cmd.ExecuteNonQuery();
    }

    private List<T> Query<T>(string sql, Func<DbDataReader, T> read, params (string Name, object? Value)[] args) =>
        _ledger.Use(db => Query(db, null, sql, read, args));

    private static List<T> Query<T>(DbConnection db, DbTransaction? tx, string sql, Func<DbDataReader, T> read, params (string Name, object? Value)[] args)
    {
        using var cmd = db.CreateCommand();
        cmd.Transaction = tx;
        cmd.CommandText = sql;
        foreach (var (n, v) in args)
        {
            Add(cmd, n, v);
        }
        using var r = cmd.ExecuteReader();
        var list = new List<T>();
        while (r.Read())
        {
            list.Add(read(r));
        }
        return list;
    }

    public void Dispose() => _ledger.Dispose();
}
