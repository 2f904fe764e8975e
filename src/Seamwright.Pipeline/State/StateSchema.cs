namespace Seamwright.Pipeline.State;

/// <summary>
/// The ledger's tables. Version 1. A newer schema than this build knows is refused (never
/// downgraded); an older one is migrated step by step inside one transaction.
/// </summary>
internal static class StateSchema
{
    public const int Version = 1;

    public const string V1 =
        """
        CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
        CREATE TABLE IF NOT EXISTS files (
            path TEXT PRIMARY KEY,          -- relative to the watched root, '/' separators
            set_id TEXT NOT NULL,
            size INTEGER NOT NULL,
            mtime INTEGER NOT NULL,         -- last write time, UTC ticks
            hash TEXT,                      -- SHA-256 (hex) when analysed
            state TEXT NOT NULL,            -- seen | analysed | bad | removed
            reason TEXT,
            analyses INTEGER NOT NULL DEFAULT 0, -- decodes + feature extractions (cache misses)
            first_seen INTEGER NOT NULL,    -- UTC ticks
            last_run INTEGER
        );
        CREATE INDEX IF NOT EXISTS files_by_set ON files(set_id);
        CREATE TABLE IF NOT EXISTS sets (
            set_id TEXT PRIMARY KEY,
            state TEXT NOT NULL,            -- pending | running | done | stale | failed
            profile TEXT NOT NULL,
            fingerprint TEXT,               -- of the last finished run
            inputs TEXT,                    -- digest of (file, size, mtime) of the last finished run
            done_run INTEGER,
            incomplete INTEGER NOT NULL DEFAULT 0,
            reason TEXT,
            first_seen INTEGER NOT NULL,
            updated INTEGER NOT NULL
        );
        CREATE TABLE IF NOT EXISTS runs (
            run_id INTEGER PRIMARY KEY AUTOINCREMENT,
            set_id TEXT NOT NULL,
            state TEXT NOT NULL,            -- running | done | abandoned
            fingerprint TEXT NOT NULL,
            tool_version TEXT NOT NULL,
            started INTEGER NOT NULL,
            finished INTEGER,
            images INTEGER, bad_files INTEGER, pairs INTEGER,
            accepted INTEGER, weak INTEGER, rejected INTEGER,
            incomplete INTEGER NOT NULL DEFAULT 0
        );
        CREATE INDEX IF NOT EXISTS runs_by_set ON runs(set_id);
        CREATE TABLE IF NOT EXISTS pair_results (
            run_id INTEGER NOT NULL,
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
            id INTEGER PRIMARY KEY AUTOINCREMENT,
            run_id INTEGER,
            set_id TEXT NOT NULL,
            path TEXT NOT NULL,
            reason TEXT NOT NULL,
            at INTEGER NOT NULL
        );
        CREATE INDEX IF NOT EXISTS failures_by_set ON failures(set_id);
        """;
}
