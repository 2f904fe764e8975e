using Seamwright.Pipeline.State;

namespace Seamwright.Tests.Support;

/// <summary>Polls an output root's ledger (read-only, safe while the service writes).</summary>
internal static class Ledger
{
    public static T Read<T>(string outputRoot, Func<StateStore, T> query)
    {
        using var store = StateStore.Open(outputRoot, readOnly: true);
        return query(store);
    }

    /// <summary>Waits until <paramref name="done"/> holds (checked twice a second) or fails with <paramref name="what"/>.</summary>
    public static void WaitUntil(string outputRoot, Func<StateStore, bool> done, TimeSpan timeout, string what, SeamwrightProcess? service = null)
    {
        var end = DateTime.UtcNow + timeout;
        while (DateTime.UtcNow < end)
        {
            if (service is { HasExited: true })
            {
                Assert.Fail($"the service exited ({service.ExitCode}) while waiting for {what}:\n{service.Output}\n{service.Errors}");
            }
            try
            {
                if (File.Exists(Path.Combine(outputRoot, StateStore.StateFolder, StateStore.DatabaseName)) && Read(outputRoot, done))
                {
                    return;
                }
            }
            catch (Microsoft.Data.Sqlite.SqliteException)
            {
                // busy: look again
            }
            catch (FileNotFoundException)
            {
                // the ledger exists but its first commit has not happened yet: look again
            }
            Thread.Sleep(500);
        }
        Assert.Fail($"timed out after {timeout} waiting for {what}" + (service is null ? "" : "\n" + service.Output + "\n" + service.Errors));
    }
}
