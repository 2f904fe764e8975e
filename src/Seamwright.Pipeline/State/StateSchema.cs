namespace Seamwright.Pipeline.State;

/// <summary>
/// The ledger's tables, one definition for both databases: <c>{bigint}</c> (64-bit integer) and
/// <c>{serial}</c> (an auto-numbered 64-bit key) are the only words that differ (see
/// <see cref="LedgerDialect.Ddl"/>). Version 2. A newer schema than this build knows is refused
/// (never downgraded); an older one is migrated step by step inside one transaction.
/// </summary>
internal static class StateSchema
{
    public const int Version = 2;

    /// <summary>The steps, in order: step i takes a ledger from version i to i + 1.</summary>
    public static IReadOnlyList<string> Steps { get; } = [V1, V2];

    public const string V1 =
        """
        CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
        CREATE TABLE IF NOT EXISTS files (
            path TEXT PRIMARY KEY,          -- relative to the watched root, '/' separators
            set_id TEXT NOT NULL,
            size {bigint} NOT NULL,
            mtime {bigint} NOT NULL,        -- last write time, UTC ticks
            hash TEXT,                      -- SHA-256 (hex) when analysed
            state TEXT NOT NULL,            -- seen | analysed | bad | removed
            reason TEXT,
            analyses INTEGER NOT NULL DEFAULT 0, -- decodes + feature extractions (cache misses)
            first_seen {bigint} NOT NULL,   -- UTC ticks
            last_run {bigint}
        );
        CREATE INDEX IF NOT EXISTS files_by_set ON files(set_id);
        CREATE TABLE IF NOT EXISTS sets (
            set_id TEXT PRIMARY KEY,
            state TEXT NOT NULL,            -- pending | running | done | stale | failed | retired
            profile TEXT NOT NULL,
            fingerprint TEXT,               -- of the last finished run
            inputs TEXT,                    -- digest of (file, size, mtime) of the last finished run
            done_run {bigint},
            incomplete INTEGER NOT NULL DEFAULT 0,
            reason TEXT,
            first_seen {bigint} NOT NULL,
            updated {bigint} NOT NULL
        );
        CREATE TABLE IF NOT EXISTS runs (
            run_id {serial},
            set_id TEXT NOT NULL,
            state TEXT NOT NULL,            -- running | done | abandoned
            fingerprint TEXT NOT NULL,
            tool_version TEXT NOT NULL,
            started {bigint} NOT NULL,
            finished {bigint},
            images INTEGER, bad_files INTEGER, pairs INTEGER,
            accepted INTEGER, weak INTEGER, rejected INTEGER,
            incomplete INTEGER NOT NULL DEFAULT 0
        );
        CREATE INDEX IF NOT EXISTS runs_by_set ON runs(set_id);
        CREATE TABLE IF NOT EXISTS pair_results (
            run_id {bigint} NOT NULL,
            set_id TEXT NOT NULL,
            image_a TEXT NOT NULL,
            image_b TEXT NOT NULL,
            status TEXT NOT NULL,
            inliers INTEGER NOT NULL,
            matches INTEGER NOT NULL,
            reasons TEXT NOT NULL,
            PRIMARY KEY (run_id, image_a, image_b)
        );
        CREATE TABLE IF NOT EXISTS failures (
            id {serial},
            run_id {bigint},
            set_id TEXT NOT NULL,
            path TEXT NOT NULL,
            reason TEXT NOT NULL,
            at {bigint} NOT NULL
        );
        CREATE INDEX IF NOT EXISTS failures_by_set ON failures(set_id);
        """;

    /// <summary>
    /// Version 2: several nodes. A run names the node that made it; a set is claimed by one node
    /// at a time under a lease (milliseconds of the database's clock) renewed by the node's
    /// heartbeat; every node records its heartbeat.
    /// </summary>
    public const string V2 =
        """
        ALTER TABLE runs ADD COLUMN node TEXT;
        CREATE TABLE IF NOT EXISTS claims (
            set_id TEXT PRIMARY KEY,
            node TEXT,                      -- NULL when released
            run_id {bigint},
            lease_until {bigint} NOT NULL DEFAULT 0, -- database clock, ms since 1970
            claimed {bigint} NOT NULL DEFAULT 0
        );
        CREATE TABLE IF NOT EXISTS nodes (
            node TEXT PRIMARY KEY,
            process_id INTEGER NOT NULL,
            started {bigint} NOT NULL,      -- database clock, ms since 1970
            beat {bigint} NOT NULL          -- database clock, ms since 1970
        );
        """;
}
