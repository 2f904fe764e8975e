namespace Seamwright.Pipeline.Settings;

/// <summary>
/// Where the ledger lives (<c>Seamwright:State</c>): the embedded SQLite file under each output root
/// (one process per output root), or a PostgreSQL database that several nodes share.
/// </summary>
public sealed class StateSettings
{
    /// <summary>"Sqlite" (default) or "PostgreSql".</summary>
    public string Provider { get; set; } = State.StateProviders.Sqlite;

    /// <summary>Npgsql connection string (PostgreSql only), e.g. <c>Host=db1;Database=seamwright;Username=seamwright;Password=...</c>.</summary>
    public string ConnectionString { get; set; } = "";

    /// <summary>Seconds a claim on a set lasts without a heartbeat renewing it (PostgreSql only); a dead node's sets are redone after this.</summary>
    public double LeaseSeconds { get; set; } = 30;

    /// <summary>Seconds before a ledger command (or a connection attempt, at most 15) gives up.</summary>
    public int CommandTimeoutSeconds { get; set; } = 30;

    public long LeaseMilliseconds => (long)Math.Round(LeaseSeconds * 1000);
}
