using System.Text.Json;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// A removed set folder retires its set, with the real processes: under `watch` (a rescan finds the
/// folder gone) and in `run`; outputs removed (only what the manifest listed), the ledger and
/// `status` (text and JSON) say retired, and a folder that comes back is processed again.
/// </summary>
public class SetRetirementTests
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(3);

    private static JsonElement StatusJson(ScratchFolder dir, out int code)
    {
        var (c, json, err) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1), "status", dir.Sub("out"), "--json");
        Assert.True(json.TrimStart().StartsWith('{'), json + err);
        code = c;
        using var doc = JsonDocument.Parse(json);
        return doc.RootElement.Clone();
    }

    private static string? LedgerState(ScratchFolder dir, string set) => Ledger.Read(dir.Sub("out"), st => st.GetSet(set)?.State);

    [Fact]
    public void Watch_SetFolderRemoved_OutputsRemovedStatusSaysRetiredFolderBackProcessedAgain()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/keep"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/gone"), 3, 10);
        TestImages.WriteSet(dir.Sub("in/noted"), 3, 20);
        using var service = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings,
            "--Seamwright:Operations:HeartbeatSeconds=1"]);
        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Count(s => s.State == SetStates.Done) == 3, Limit, "three sets done", service);
        File.WriteAllText(dir.Sub("out/noted/operator-notes.txt"), "not a Seamwright output");
        var keepBefore = TestImages.Hashes(dir.Sub("out/keep"));

        Directory.Delete(dir.Sub("in/gone"), recursive: true);
        Directory.Delete(dir.Sub("in/noted"), recursive: true);
        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Count(s => s.State == SetStates.Retired) == 2, Limit, "two sets retired", service);

        Assert.False(Directory.Exists(dir.Sub("out/gone")), "outputs of the removed set remain");
        Assert.Equal(["operator-notes.txt"], Directory.GetFileSystemEntries(dir.Sub("out/noted")).Select(Path.GetFileName));
        Assert.Equal(keepBefore, TestImages.Hashes(dir.Sub("out/keep")));
        Assert.Equal(["keep"], Directory.GetDirectories(dir.Sub("in")).Select(Path.GetFileName));
        var status = StatusJson(dir, out int code);
        Assert.Equal(0, code);
        Assert.Equal(2, status.GetProperty("sets").GetProperty("retired").GetInt32());
        Assert.Equal(0, status.GetProperty("sets").GetProperty("stale").GetInt32());
        Assert.Equal(["gone:retired", "noted:retired"], status.GetProperty("setsNotDone").EnumerateArray()
            .Select(s => s.GetProperty("name").GetString() + ":" + s.GetProperty("state").GetString()).Order(StringComparer.Ordinal));
        var (_, text, _) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1), "status", dir.Sub("out"));
        Assert.Contains("0 stale, 0 failed, 2 retired)", text, StringComparison.Ordinal);
        Assert.Contains("retired  gone  (" + SetRetirement.Reason + ")", text, StringComparison.Ordinal);

        TestImages.WriteSet(dir.Sub("in/gone"), 3, 10);
        Ledger.WaitUntil(dir.Sub("out"), st => st.GetSet("gone")?.State == SetStates.Done, Limit, "the returned set done again", service);
        OutputChecks.ManifestIsComplete(dir.Sub("out/gone"));
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)), "did not stop");
        Assert.Equal(0, service.ExitCode);
        Assert.Contains("retired: its folder was removed, so its outputs were removed", service.Output, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_SetFolderRemovedBetweenRuns_RetiredAndSaidSoAnotherRootSharingTheOutputRetiresNothing()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/a"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/b"), 3, 10);
        TestImages.WriteSet(dir.Sub("other/c"), 3, 20);
        string[] Args(string input) => ["run", dir.Sub(input), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings];
        Assert.Equal(0, SeamwrightProcess.Run(dir.Path, Limit, Args("in")).Code);
        Directory.Delete(dir.Sub("in/b"), recursive: true);

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, Args("in"));

        Assert.True(code == 0, $"exit {code}\n{stdout}\n{stderr}");
        Assert.Contains("Set b retired", stdout, StringComparison.Ordinal);
        Assert.False(Directory.Exists(dir.Sub("out/b")));
        Assert.Equal(SetStates.Retired, LedgerState(dir, "b"));
        Assert.Equal(SetStates.Done, LedgerState(dir, "a"));

        // Another input folder run into the same output root: its sets are processed, those of the first root are not retired.
        var (otherCode, otherOut, otherErr) = SeamwrightProcess.Run(dir.Path, Limit, Args("other"));
        Assert.True(otherCode == 0, $"exit {otherCode}\n{otherOut}\n{otherErr}");
        Assert.DoesNotContain("retired", otherOut, StringComparison.Ordinal);
        Assert.Equal(SetStates.Done, LedgerState(dir, "a"));
        Assert.True(File.Exists(dir.Sub("out/a/" + OutputLayout.ManifestName)));
    }
}
