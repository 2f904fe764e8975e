using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;

namespace Seamwright.Host.Tests.Integration;

/// <summary>The one-shot commands, run as the real process.</summary>
public class RunCommandTests
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(3);

    [Fact]
    public void Run_TwoSetsDropped_EachGetsSidecarsTiePointsConfidenceRecordsAndManifestLast()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/maps/sheet-a"), 4, 1);
        TestImages.WriteSet(dir.Sub("in/turn"), 3, 50);

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, ["run", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings]);

        Assert.True(code == 0, stdout + stderr);
        foreach (var (set, images, pairs) in new[] { ("maps/sheet-a", 4, 5), ("turn", 3, 3) })
        {
            var m = OutputChecks.ManifestIsComplete(dir.Sub("out/" + set));
            Assert.Equal(images, m.Files.Count(f => f.Kind == "sidecar"));
            Assert.Equal(pairs, m.Files.Count(f => f.Kind == "tiepoints"));
            Assert.Equal(pairs, ConfidenceLog.ReadAll(dir.Sub("out/confidence.jsonl")).Count(r => r.Set == set && r.Run == m.Run));
        }
        Assert.Contains("maps/sheet-a", stdout, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_TestEngineWithoutTestHooks_RefusedAsBadSetting()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/a"), 2, 1);
        using var p = SeamwrightProcess.StartWithEnvironment(dir.Path, new Dictionary<string, string> { ["SEAMWRIGHT_TEST_HOOKS"] = "0" },
            ["run", dir.Sub("in"), "--output", dir.Sub("out"), "--Seamwright:Engine=checksum"]);
        Assert.True(p.WaitForExit(Limit), "did not finish");

        Assert.True(p.ExitCode == 2, $"exit {p.ExitCode}\n{p.Output}\n{p.Errors}");
        Assert.Contains("Seamwright:Engine", p.Output + p.Errors, StringComparison.Ordinal);
        Assert.False(Directory.Exists(dir.Sub("out/a")));
    }

    [Fact]
    public void Run_UnchangedSecondRun_DoesNothingSaysSoAndOutputsByteIdentical()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/a"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/b"), 3, 9);
        string[] args = ["run", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings];
        Assert.Equal(0, SeamwrightProcess.Run(dir.Path, Limit, args).Code);
        var before = OutputHashes(dir.Sub("out"));

        var (code, stdout, _) = SeamwrightProcess.Run(dir.Path, Limit, args);

        Assert.Equal(0, code);
        Assert.Contains("Nothing to do", stdout, StringComparison.Ordinal);
        Assert.Equal(before, OutputHashes(dir.Sub("out")));
        using var store = StateStore.Open(dir.Sub("out"), readOnly: true);
        Assert.Equal(2, store.Runs().Count);
    }

    [Fact]
    public void Run_BrokenFiles_ExitThreeRecordedWithReasonsInputsByteIdentical()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        File.WriteAllText(dir.Sub("in/s/notes.png"), "plain text named like an image");
        var inputs = TestImages.Hashes(dir.Sub("in"));

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, ["run", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings]);

        Assert.True(code == 3, $"exit {code}\n{stdout}\n{stderr}");
        Assert.Equal(inputs, TestImages.Hashes(dir.Sub("in")));
        var m = OutputChecks.ManifestIsComplete(dir.Sub("out/s"));
        Assert.Equal("notes.png", Assert.Single(m.Skipped).Image);
        Assert.Single(ConfidenceLog.ReadAll(dir.Sub("out/confidence.jsonl")), r => r.Kind == "file" && r.ImageA == "notes.png");
        var (_, status, _) = SeamwrightProcess.Run(dir.Path, Limit, ["status", dir.Sub("out")]);
        Assert.Contains("bad file s/notes.png", status, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_SettingOutOfRange_ExitTwoNamingTheSettingAndRange()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 2, 1);
        var (code, _, stderr) = SeamwrightProcess.Run(dir.Path, Limit,
            ["run", dir.Sub("in"), "--output", dir.Sub("out"), "--Seamwright:Profiles:default:Pairing:NeighbourSpan=1", "--Seamwright:Engine=checksum"]);
        Assert.Equal(2, code);
        Assert.Contains("Seamwright:Profiles:default:Pairing:NeighbourSpan is 1; allowed: 2 to 64", stderr, StringComparison.Ordinal);
        Assert.False(Directory.Exists(dir.Sub("out")));
    }

    [Fact]
    public void Rerun_OneProfileChanged_DryRunPredictsAndOnlyThoseSetsAreRedone()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/maps/m1"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/maps/m2"), 3, 5);
        TestImages.WriteSet(dir.Sub("in/turns/t1"), 3, 9);
        string config = dir.Sub("settings.json");
        File.WriteAllText(config, Config(thresholdForMaps: 3.0));
        string[] run = ["run", dir.Sub("in"), "--output", dir.Sub("out"), "--config", config, .. SeamwrightProcess.FastSettings];
        Assert.Equal(0, SeamwrightProcess.Run(dir.Path, Limit, run).Code);
        byte[] turnManifest = File.ReadAllBytes(dir.Sub("out/turns/t1/" + OutputLayout.ManifestName));

        File.WriteAllText(config, Config(thresholdForMaps: 2.0));
        var (dryCode, dry, _) = SeamwrightProcess.Run(dir.Path, Limit, ["rerun", dir.Sub("in"), "--dry-run", "--output", dir.Sub("out"), "--config", config, .. SeamwrightProcess.FastSettings]);
        var predicted = dry.Split('\n').Where(l => l.StartsWith("  ", StringComparison.Ordinal)).Select(l => l.Trim().Split('\t')[0]).Order().ToArray();
        Assert.Equal(ExitCodes.FinishedWithProblems, dryCode); // 3: something would be redone
        Assert.Equal(new[] { "maps/m1", "maps/m2" }, predicted);

        var (code, stdout, _) = SeamwrightProcess.Run(dir.Path, Limit, ["rerun", dir.Sub("in"), "--output", dir.Sub("out"), "--config", config, .. SeamwrightProcess.FastSettings]);

        Assert.Equal(0, code);
        using var store = StateStore.Open(dir.Sub("out"), readOnly: true);
        var redone = store.Runs().Where(r => r.RunId > 3).Select(r => r.SetId).Order().ToArray();
        Assert.Equal(predicted, redone);
        Assert.Equal(turnManifest, File.ReadAllBytes(dir.Sub("out/turns/t1/" + OutputLayout.ManifestName)));
        Assert.Contains("2 sets processed, 1 unchanged", stdout, StringComparison.Ordinal);
        Assert.Equal(3, store.Files().Sum(f => f.Path.StartsWith("maps/m1", StringComparison.Ordinal) ? f.Analyses : 0)); // features came from the cache
    }

    private static string Config(double thresholdForMaps) =>
        $$"""
        {
          "Seamwright": {
            "Run": { "ProfileRules": [ { "Match": "maps/**", "Profile": "tiles" } ] },
            "Profiles": {
              "default": { },
              "tiles": { "Estimation": { "MotionModel": "Similarity", "ThresholdPx": {{thresholdForMaps.ToString(System.Globalization.CultureInfo.InvariantCulture)}} } }
            }
          }
        }
        """;

    internal static Dictionary<string, string> OutputHashes(string outputRoot) =>
        TestImages.Hashes(outputRoot).Where(kv => !kv.Key.StartsWith(".seamwright", StringComparison.Ordinal)).ToDictionary();
}
