using System.Text.Json;
using Seamwright.Host.Operations;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// `seamwright status` against the real service process: the service state in text and JSON
/// (running, not-responding under SIGSTOP, stopped after SIGTERM, not-started), its exit codes,
/// files waiting for their quiet period, nothing written into the watched root, and a silent
/// watcher detected by periodic rescans.
/// </summary>
public class StatusCommandTests(ITestOutputHelper output)
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(3);

    private static (int Code, JsonElement Doc, string Text) Status(ScratchFolder dir, string path)
    {
        var (code, json, err) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1), "status", path, "--json");
        Assert.True(json.TrimStart().StartsWith('{'), json + err);
        using var doc = JsonDocument.Parse(json);
        return (code, doc.RootElement.Clone(), json);
    }

    private static string State(JsonElement doc) => doc.GetProperty("service").GetProperty("state").GetString()!;

    [Fact]
    public void Status_ServiceLifecycle_StateAndExitCodeTellRunningHungStoppedAndNotStarted()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        Directory.CreateDirectory(dir.Sub("elsewhere"));
        var (neverCode, never, _) = Status(dir, dir.Sub("elsewhere"));
        Assert.Equal("not-started", State(never));
        Assert.Equal(ExitCodes.ServiceNotRunning, neverCode);
        var (missingCode, _, missingErr) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1), "status", dir.Sub("nonexistent"));
        Assert.Equal(ExitCodes.BadArguments, missingCode);
        Assert.Contains("does not exist", missingErr, StringComparison.Ordinal);

        using var service = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings,
            "--Seamwright:Operations:HeartbeatSeconds=1", "--Seamwright:Profiles:default:Completion:QuietSeconds=600"]);
        string heartbeat = Path.Combine(dir.Sub("out"), StateStore.StateFolder, HeartbeatFile.FileName);
        WaitFor(() => HeartbeatFile.TryRead(heartbeat) is not null, "the first heartbeat", service);
        Directory.CreateDirectory(dir.Sub("in/late"));
        TestImages.WriteSet(dir.Sub("in/late"), 2, seedBase: 40);
        WaitFor(() => HeartbeatFile.TryRead(heartbeat) is { Waiting.Count: 1 }, "the waiting set in the heartbeat", service);

        var (runningCode, running, runningJson) = Status(dir, dir.Sub("out"));
        output.WriteLine(runningJson);
        Assert.Equal("running", State(running));
        Assert.True(running.GetProperty("service").GetProperty("healthy").GetBoolean());
        Assert.Equal(ExitCodes.Ok, runningCode);
        using var schema = JsonDocument.Parse(File.ReadAllText(Path.Combine(Seamwright.Tests.Shared.RepoPaths.Root, "docs", "schemas", "seamwright.status.v1.schema.json")));
        Assert.Equal(schema.RootElement.GetProperty("properties").EnumerateObject().Select(p => p.Name).Order(StringComparer.Ordinal),
            running.EnumerateObject().Select(p => p.Name).Order(StringComparer.Ordinal));
        string waiting = running.GetProperty("service").GetProperty("figures").GetProperty("waiting")[0].GetString()!;
        Assert.StartsWith("late: 2 files", waiting, StringComparison.Ordinal);
        var (textCode, text, _) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1), "status", dir.Sub("out"));
        Assert.Equal(ExitCodes.Ok, textCode);
        Assert.Contains("service: running, healthy", text, StringComparison.Ordinal);
        Assert.Contains("waiting for their files to settle: 1 sets", text, StringComparison.Ordinal);

        // A hang (SIGSTOP): the heartbeat ages past three beats while the process is still there.
        Signal(service, "STOP");
        try
        {
            Thread.Sleep(TimeSpan.FromSeconds(5));
            var (hungCode, hung, _) = Status(dir, dir.Sub("out"));
            Assert.Equal("not-responding", State(hung));
            Assert.Equal(ExitCodes.ServiceUnhealthy, hungCode);
        }
        finally
        {
            Signal(service, "CONT");
        }

        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        Assert.Equal(0, service.ExitCode);
        Assert.Equal("stopped", HeartbeatFile.TryRead(heartbeat)!.State);
        Assert.False(HeartbeatFile.TryRead(heartbeat)!.Healthy);
        var (stoppedCode, stopped, _) = Status(dir, dir.Sub("out"));
        Assert.Equal("stopped", State(stopped));
        Assert.Equal(ExitCodes.ServiceNotRunning, stoppedCode);
        var (stoppedTextCode, stoppedText, _) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1), "status", dir.Sub("out"));
        Assert.Equal(ExitCodes.ServiceNotRunning, stoppedTextCode);
        Assert.Contains("service: stopped (stopped cleanly)", stoppedText, StringComparison.Ordinal);

        // Nothing of ours in the watched root (inputs are only read).
        Assert.Equal(["in/late/img001.png", "in/late/img002.png"],
            Directory.GetFileSystemEntries(dir.Sub("in"), "*", SearchOption.AllDirectories).Where(File.Exists)
                .Select(f => Path.GetRelativePath(dir.Path, f).Replace('\\', '/')).Order(StringComparer.Ordinal).ToArray());
    }

    [Fact]
    public void Watch_SilentWatcher_PeriodicRescanFindsTheSetCountsMissedChangesAndRecreatesTheWatcher()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        using var service = SeamwrightProcess.StartWithEnvironment(dir.Path,
            new Dictionary<string, string> { ["SEAMWRIGHT_TEST_DEAF_WATCHER"] = "1" },
            ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings, "--Seamwright:Operations:HeartbeatSeconds=1"]);
        string heartbeat = Path.Combine(dir.Sub("out"), StateStore.StateFolder, HeartbeatFile.FileName);
        WaitFor(() => HeartbeatFile.TryRead(heartbeat) is not null, "the first heartbeat", service);
        Directory.CreateDirectory(dir.Sub("in/shelf"));
        TestImages.WriteSet(dir.Sub("in/shelf"), 3, seedBase: 50);

        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Any(s => s.State == SetStates.Done), Limit, "the set found by a rescan", service);
        WaitFor(() => HeartbeatFile.TryRead(heartbeat) is { Watchers: [{ Recreated: 1 }] }, "the watcher recreated", service);
        var w = Assert.Single(HeartbeatFile.TryRead(heartbeat)!.Watchers);
        Assert.True(w.MissedEvents >= 1, "missed changes counted");
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        Assert.Contains("missed", service.Output, StringComparison.Ordinal);
        Assert.Contains("recreating it", service.Output, StringComparison.Ordinal);
    }

    private static void Signal(SeamwrightProcess service, string signal)
    {
        using var kill = System.Diagnostics.Process.Start("kill", [$"-{signal}", service.ProcessId.ToString(System.Globalization.CultureInfo.InvariantCulture)]);
        kill.WaitForExit();
    }

    private static void WaitFor(Func<bool> condition, string what, SeamwrightProcess service)
    {
        var end = DateTime.UtcNow + Limit;
        while (!condition())
        {
            if (service.HasExited || DateTime.UtcNow > end)
            {
                Assert.Fail($"waiting for {what}: {(service.HasExited ? "the service exited" : "timed out")}\n{service.Output}\n{service.Errors}");
            }
            Thread.Sleep(250);
        }
    }
}
