using Seamwright.Host.Operations;
using Seamwright.Host.Tests.Supervision;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// The real `seamwright watch` process with supervised decoding and the health loop: hostile and
/// fatal inputs, the heartbeat file, `status`, and a non-zero exit on an unrecoverable error.
/// </summary>
public class ServiceOperationsTests(ITestOutputHelper output)
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(3);

    [Fact]
    public void Watch_HostileAndFatalFiles_RecordedQuarantinedStatusShowsFiguresServiceKeepsRunning()
    {
        using var dir = new ScratchFolder();
        string set = dir.Sub("in/shelf-a");
        Directory.CreateDirectory(set);
        TestImages.WriteSet(set, 3, seedBase: 10);
        var valid = CraftedFiles.ValidSmallImages(64);
        File.WriteAllBytes(Path.Combine(set, "crashes.png"), valid[0].Bytes);
        File.WriteAllBytes(Path.Combine(set, "bigtiff.tif"), CraftedFiles.BigTiffHugeEntryCount());
        File.WriteAllBytes(Path.Combine(set, "offset.bmp"), CraftedFiles.BmpHugePixelOffset());
        File.WriteAllBytes(Path.Combine(set, "huge.png"), CraftedFiles.PngClaiming60000Squared());
        File.WriteAllBytes(Path.Combine(set, "text.png"), CraftedFiles.TextNamedPng());
        var inputsBefore = Directory.GetFiles(set).ToDictionary(f => f, File.ReadAllBytes);

        using var service = SeamwrightProcess.StartWithEnvironment(dir.Path,
            new Dictionary<string, string> { ["SEAMWRIGHT_TEST_HOOKS"] = "1", ["SEAMWRIGHT_TEST_FAULTS"] = "crash:crashes.png" },
            ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings,
             "--Seamwright:Supervision:StrikesBeforeQuarantine=2", "--Seamwright:Supervision:MemoryCapMegabytes=512",
             "--Seamwright:Supervision:JobTimeoutSeconds=5",
             "--Seamwright:Operations:HeartbeatSeconds=1"]);

        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Any(s => s.State == SetStates.Done), Limit, "the set done", service);
        string heartbeat = Path.Combine(dir.Sub("out"), StateStore.StateFolder, HeartbeatFile.FileName);
        OperationsFigures? figures = null;
        var giveUp = DateTime.UtcNow + TimeSpan.FromSeconds(30);
        while ((figures = HeartbeatFile.TryRead(heartbeat)) is not { Quarantined.Count: >= 2 } && DateTime.UtcNow < giveUp)
        {
            Thread.Sleep(200);
        }
        var (code, status, errors) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1), "status", dir.Sub("out"));
        output.WriteLine(status);
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));

        Assert.Equal(0, service.ExitCode); // a clean stop, after quarantining and rejecting files
        Assert.Equal(0, code);
        Assert.NotNull(figures);
        Assert.True(figures.Healthy, string.Join("; ", figures.Problems));
        Assert.Contains(figures.Quarantined, q => q.Contains("crashes.png", StringComparison.Ordinal));
        // The checksum engine decodes with ImageSharp directly (no structure check), so the
        // BigTIFF entry count really hangs the decoder (GHSA-wmxv-xphr-5c9g): two time-outs.
        Assert.Contains(figures.Quarantined, q => q.Contains("bigtiff.tif", StringComparison.Ordinal));
        Assert.Equal(4, figures.WorkerKills);
        Assert.True(figures.PeakWorkerMegabytes <= 512);
        Assert.Contains("service: running, healthy", status, StringComparison.Ordinal);
        Assert.Contains("quarantined files: 2", status, StringComparison.Ordinal);
        Assert.Contains("crashes.png: 2 failed decode attempts, last: worker crashed (signal 6)", status, StringComparison.Ordinal);
        Assert.Contains("test fault: crash on crashes.png", status, StringComparison.Ordinal);
        Assert.Contains("bigtiff.tif: 2 failed decode attempts, last: worker killed: decode ran past the 5 s limit", status, StringComparison.Ordinal);
        var files = Ledger.Read(dir.Sub("out"), st => st.Files());
        Assert.Equal(3, files.Count(f => f.State == "analysed"));
        foreach (string bad in new[] { "crashes.png", "bigtiff.tif", "offset.bmp", "huge.png", "text.png" })
        {
            var record = Assert.Single(files, f => f.Path.EndsWith(bad, StringComparison.Ordinal));
            Assert.Equal("bad", record.State);
            Assert.False(string.IsNullOrWhiteSpace(record.Reason));
        }
        Assert.All(inputsBefore, kv => Assert.Equal(kv.Value, File.ReadAllBytes(kv.Key)));
        Assert.DoesNotContain(System.Diagnostics.Process.GetProcesses(), p => IsOurWorker(p, dir.Path));
    }

    [Fact]
    public void Watch_WithNotifySocketAndWatchdog_SendsWatchdogHeartbeatAndStatus()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        string socketPath = Path.Combine(dir.Path, "notify.sock");
        using var systemd = new System.Net.Sockets.Socket(System.Net.Sockets.AddressFamily.Unix, System.Net.Sockets.SocketType.Dgram, System.Net.Sockets.ProtocolType.Unspecified);
        systemd.Bind(new System.Net.Sockets.UnixDomainSocketEndPoint(socketPath));
        systemd.ReceiveTimeout = 60_000;
        // As systemd sets them for WatchdogSec=2s (sd_watchdog_enabled(3)).
        using var service = SeamwrightProcess.StartWithEnvironment(dir.Path,
            new Dictionary<string, string> { ["NOTIFY_SOCKET"] = socketPath, ["WATCHDOG_USEC"] = "2000000" },
            ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings]);
        var seen = new List<string>();
        var buffer = new byte[4096];
        while (seen.Count(m => m == "WATCHDOG=1") < 3)
        {
            int n = systemd.Receive(buffer); // throws after 60 s of silence: no heartbeat
            seen.Add(System.Text.Encoding.UTF8.GetString(buffer, 0, n));
        }
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        Assert.Equal(0, service.ExitCode);
        Assert.Contains(seen, m => m.StartsWith("STATUS=healthy; queue 0", StringComparison.Ordinal));
    }

    [Fact]
    public void Watch_StartupErrors_OneLineExitTwoNoStackTrace()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        File.WriteAllText(dir.Sub("out"), "a file where the output folder should be");
        var (fileCode, fileOut, fileErr) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1),
            ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings]);
        var (missingCode, missingOut, missingErr) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1),
            ["watch", dir.Sub("nowhere"), "--output", dir.Sub("out2"), .. SeamwrightProcess.FastSettings]);

        Assert.Equal(ExitCodes.BadArguments, fileCode);
        Assert.Equal(ExitCodes.BadArguments, missingCode);
        Assert.Single(fileErr.Trim().Split('\n'));
        Assert.Equal("seamwright: the folder to watch does not exist: " + dir.Sub("nowhere"), missingErr.Trim());
        foreach (string text in new[] { fileOut + fileErr, missingOut + missingErr })
        {
            Assert.DoesNotContain("   at ", text, StringComparison.Ordinal); // no stack trace
            Assert.DoesNotContain(".cs:line", text, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void Watch_BadSupervisionSetting_ExitsBadArgumentsNamingIt()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        var (code, stdout, errors) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1),
            ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings, "--Seamwright:Supervision:Workers=0"]);
        Assert.Equal(ExitCodes.BadArguments, code);
        Assert.Contains("Supervision:Workers must be 1..32", stdout + errors, StringComparison.Ordinal);
    }

    /// <summary>
    /// A worker started with this test's cap (512 MiB) in this test's folder (its working
    /// directory, inherited from the service) still running after the service stopped; workers
    /// of the same test run by someone else on the machine do not count.
    /// </summary>
    private static bool IsOurWorker(System.Diagnostics.Process p, string folder)
    {
        try
        {
            return p.ProcessName is "seamwright" or "dotnet" && File.Exists($"/proc/{p.Id}/cmdline")
                && File.ReadAllText($"/proc/{p.Id}/cmdline").Contains("worker\0--memory-mb\0512", StringComparison.Ordinal)
                && new DirectoryInfo($"/proc/{p.Id}/cwd").LinkTarget is { } cwd && Path.GetFullPath(cwd) == Path.GetFullPath(folder);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return false;
        }
    }
}
