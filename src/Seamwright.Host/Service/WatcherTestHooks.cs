namespace Seamwright.Host.Service;

/// <summary>
/// Test-only: with <c>SEAMWRIGHT_TEST_HOOKS=1</c> and <c>SEAMWRIGHT_TEST_DEAF_WATCHER=1</c> the first
/// watcher the service creates drops every event, as a watcher that went silent would; the ones
/// recreated after it work. Inert without both variables.
/// </summary>
internal static class WatcherTestHooks
{
    private static int _deafLeft = Environment.GetEnvironmentVariable("SEAMWRIGHT_TEST_HOOKS") == "1"
        && Environment.GetEnvironmentVariable("SEAMWRIGHT_TEST_DEAF_WATCHER") == "1" ? 1 : 0;

    /// <summary>True once (for the first watcher) when the hook is on.</summary>
    public static bool TakeDeafWatcher() => Interlocked.Exchange(ref _deafLeft, 0) == 1;
}
