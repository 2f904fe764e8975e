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
        using var service = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), "--config", config,
            "--Seamwright:Engine=checksum", "--Seamwright:Service:StableSeconds=0.5", "--Seamwright:Service:PollMilliseconds=200"]);
        var limit = TimeSpan.FromMinutes(3);
        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Count(s => s.State == SetStates.Done) == 2, limit, "both sets done", service);
        var before = Ledger.Read(dir.Sub("out"), st => st.Sets().ToDictionary(s => s.SetId, s => s.DoneRun));

        File.WriteAllText(config, Config(2.0, 1)); // only the "tiles" profile changes a result-shaping setting

        Ledger.WaitUntil(dir.Sub("out"), st => st.GetSet("maps/m1")!.DoneRun > before["maps/m1"] && st.GetSet("maps/m1")!.State == SetStates.Done,
            limit, "maps/m1 redone after the reload", service);
        Thread.Sleep(3000); // give a wrong redo of the other set time to show
        var after = Ledger.Read(dir.Sub("out"), st => st.Sets().ToDictionary(s => s.SetId, s => s.DoneRun));
        Assert.Equal(before["turns/t1"], after["turns/t1"]);
        Assert.Equal(3, Ledger.Read(dir.Sub("out"), st => st.Runs().Count));
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        Assert.Contains("Settings reloaded", service.Output, StringComparison.Ordinal);
    }
}
