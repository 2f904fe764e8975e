using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Tests.Support;

/// <summary>Opens a root session with the fast test engine.</summary>
internal static class Sessions
{
    public static SeamwrightOptions Options(Action<ProfileSettings>? profile = null)
    {
        var o = new SeamwrightOptions { Engine = ChecksumEngine.EngineName };
        var p = new ProfileSettings();
        profile?.Invoke(p);
        o.Profiles["default"] = p;
        return o;
    }

    public static RootSession Open(string input, string output, SeamwrightOptions options) =>
        RootSession.Open(options.RootFor(input, output), options, new ChecksumEngine(), new MemoryBudget(256L << 20), new SemaphoreSlim(2), NullObserver.Instance);
}
