using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;

namespace Seamwright.Host.Tests.Integration;

/// <summary>Saving the settings file while the service runs redoes exactly the sets whose fingerprint changed.</summary>
public class WatchReloadTests
{
    private static string Config(double threshold, int quiet) =>
        $$"""
        {
          "Seamwright": {
            "Run": { "ProfileRules": [ { "Match": "maps/**", "Profile": "tiles" } ] },
            "Profiles": {
              "default": { "Completion": { "QuietSeconds": {{quiet}} } },
              "tiles": { "Completion": { "QuietSeconds": {{quiet}} }, "Estimation": { "ThresholdPx": {{threshold.ToString(System.Globalization.CultureInfo.InvariantCulture)}} } }
            }
          }
        }
        """;

    [Fact]
    public void Watch_SettingsFileSaved_OnlySetsOfTheChangedProfileRedone()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/maps/m1"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/turns/t1"), 3, 9);
        string config = dir.Sub("settings.json");
        File.WriteAllText(config, Config(3.0, 1));
        var written = DateTime.UtcNow;
        using var service = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), "--config", config,
            "--Seamwright:Engine=checksum", "--Seamwright:Service:StableSeconds=0.5", "--Seamwright:Service:PollMilliseconds=200",
            "--Seamwright:Operations:HeartbeatSeconds=1"]);
        var limit = TimeSpan.FromMinutes(3);
        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Count(s => s.State == SetStates.Done) == 2, limit, "both sets done", service);
        var before = Ledger.Read(dir.Sub("out"), st => st.Sets().ToDictionary(s => s.SetId, s => s.DoneRun));

        // A save with a syntax error: logged with the file and the parser's line, the old settings stay (nothing redone).
        File.WriteAllText(config, "{ \"Seamwright\": { \"Profiles\": \n ,, } }");
        WaitForLog(service, "Settings reload ignored", limit);
        Thread.Sleep(TimeSpan.FromSeconds(Math.Max(0, 8 - (DateTime.UtcNow - written).TotalSeconds))); // the redo below must come well after the images arrived
        var saved = DateTime.UtcNow;
        File.WriteAllText(config, Config(2.0, 1)); // only the "tiles" profile changes a result-shaping setting

        Ledger.WaitUntil(dir.Sub("out"), st => st.GetSet("maps/m1")!.DoneRun > before["maps/m1"] && st.GetSet("maps/m1")!.State == SetStates.Done,
            limit, "maps/m1 redone after the reload", service);
        Thread.Sleep(3000); // give a wrong redo of the other set time to show
        var after = Ledger.Read(dir.Sub("out"), st => st.Sets().ToDictionary(s => s.SetId, s => s.DoneRun));
        Assert.Equal(before["turns/t1"], after["turns/t1"]);
        Assert.Equal(3, Ledger.Read(dir.Sub("out"), st => st.Runs().Count));
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        Assert.Contains("Settings reloaded from " + config + ": Seamwright:Profiles:tiles:Estimation:ThresholdPx: 3 -> 2", service.Output, StringComparison.Ordinal);
        Assert.Contains("cannot be read", service.Output, StringComparison.Ordinal);
        Assert.Contains("LineNumber: ", service.Output, StringComparison.Ordinal);
        Assert.Equal(2, before.Count);
        // Arrival-to-output of the redo counts from the save that triggered it, not from the images' arrival.
        var figures = Seamwright.Host.Operations.HeartbeatFile.TryRead(Path.Combine(dir.Sub("out"), StateStore.StateFolder, Seamwright.Host.Operations.HeartbeatFile.FileName))!;
        Assert.Equal(3, figures.LatencySamples);
        double sinceImages = (saved - written).TotalSeconds;
        Assert.True(figures.ArrivalToOutputP95Seconds < sinceImages - 2, $"p95 {figures.ArrivalToOutputP95Seconds} s, images written {sinceImages:0.0} s before the save");
    }

    private static void WaitForLog(SeamwrightProcess service, string text, TimeSpan limit)
    {
        var end = DateTime.UtcNow + limit;
        while (!service.Output.Contains(text, StringComparison.Ordinal))
        {
            Assert.True(DateTime.UtcNow < end && !service.HasExited, $"no '{text}' in the log:\n{service.Output}\n{service.Errors}");
            Thread.Sleep(200);
        }
    }
}
