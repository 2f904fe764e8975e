namespace Seamwright.Tests.Shared;

/// <summary>
/// The PostgreSQL server for the shared-ledger tests: <c>SEAMWRIGHT_TEST_PG</c> holds an Npgsql
/// connection string (<c>.ci/run</c> and <c>tools/test-postgres.sh</c> start a throwaway cluster and
/// set it). Without it a test skips with a message, except under <c>CI=true</c>, where it fails.
/// </summary>
internal static class TestPostgres
{
    public const string Variable = "SEAMWRIGHT_TEST_PG";

    /// <summary>The connection string, or null (after writing the skip message) when no server is configured outside CI.</summary>
    public static string? ConnectionStringOrSkip(Action<string> output)
    {
        string? conn = Environment.GetEnvironmentVariable(Variable);
        if (!string.IsNullOrWhiteSpace(conn))
        {
            return conn;
        }
        if (RepoPaths.IsCi)
        {
            throw new InvalidOperationException(Variable + " is not set under CI=true: .ci/run should have started a PostgreSQL cluster.");
        }
        output("SKIPPED: no PostgreSQL server (" + Variable + " unset; eval \"$(bash tools/test-postgres.sh start)\" starts one).");
        return null;
    }
}
