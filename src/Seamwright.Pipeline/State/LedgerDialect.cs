using System.Data.Common;

namespace Seamwright.Pipeline.State;

/// <summary>
/// What differs between the two ledger databases: how a connection is had (one shared SQLite
/// connection under a lock, or a pooled PostgreSQL connection per call), the few type names of
/// the schema, the database clock and row locking. Every statement of <see cref="StateStore"/>
/// is written once, with <c>@name</c> parameters, and runs on both.
/// </summary>
internal abstract class LedgerDialect : IDisposable
{
    /// <summary>"Sqlite" or "PostgreSql" (the setting's spelling).</summary>
    public abstract string Name { get; }

    /// <summary>Where the ledger lives, for messages (a file path, or host/database/schema).</summary>
    public abstract string Location { get; }

    /// <summary>Runs <paramref name="work"/> on an open connection (serialised for SQLite).</summary>
    public abstract T Use<T>(Func<DbConnection, T> work);

    /// <summary>The schema template with its type tokens replaced (<c>{bigint}</c>, <c>{serial}</c>).</summary>
    public abstract string Ddl(string template);

    /// <summary>SQL expression for the database's clock in milliseconds since 1970 (leases use the database's clock, not the nodes').</summary>
    public abstract string NowMilliseconds { get; }

    /// <summary>Suffix of a SELECT that locks the rows it returns and skips rows other sessions hold ("" for SQLite: one writer at a time anyway).</summary>
    public abstract string ForUpdateSkipLocked { get; }

    /// <summary>The stored schema version (0 when the ledger has never been initialised).</summary>
    public abstract int StoredVersion(DbConnection db, DbTransaction? tx = null);

    /// <summary>Called first in the migration transaction: serialises concurrent migrations (several nodes starting at once).</summary>
    public virtual void BeforeMigration(DbConnection db, DbTransaction tx)
    {
    }

    public abstract void Dispose();
}
