using System.Net.Sockets;
using System.Text;
using Microsoft.Extensions.Logging.Abstractions;
using Seamwright.Core.Estimation;
using Seamwright.Host.Operations;

namespace Seamwright.Host.Tests.Operations;

/// <summary>Heartbeat file, watchdog ping and status figures under an injected stall and a full disk.</summary>
public sealed class OperationsLoopTests : IDisposable
{
    private readonly string _folder = Directory.CreateTempSubdirectory("sw-ops-").FullName;
    private readonly ManualClock _clock = new(new DateTimeOffset(2026, 12, 1, 12, 0, 0, TimeSpan.Zero));

    public void Dispose() => Directory.Delete(_folder, true);

    private sealed class FixedFigures : IServiceFigureSource
    {
        public int QueueDepth { get; set; } = 4;

        public IReadOnlyList<string> StuckSets() => ["roots/a/set-7: waiting 00:12:00, maximum 00:10:00"];

        public IReadOnlyList<string> Quarantined() => ["/in/bad.tif: 3 failed decode attempts"];

        public IReadOnlyList<string> Waiting() => ["scans/b: 3 files, 1 still within the 10 s quiet period"];
    }

    private sealed class ScriptedProbe : IFreeSpaceProbe
    {
        public long Free { get; set; } = 10L << 30;

        public long FreeBytes(string path) => Free;
    }

    [Fact]
    public void Tick_LoopStalls_HeartbeatAndWatchdogWithheldStatusShowsStall()
    {
        var health = new HealthMonitor(_clock);
        health.Register("scheduler", TimeSpan.FromSeconds(30));
        var metrics = new OperationsMetrics();
        foreach (var s in new[] { PairStatus.Accepted, PairStatus.Accepted, PairStatus.Weak, PairStatus.Rejected })
        {
            metrics.RecordPair(s);
        }
        metrics.RecordSetOutput(_clock.GetUtcNow(), _clock.GetUtcNow().AddSeconds(4));
        metrics.RecordSetOutput(_clock.GetUtcNow(), _clock.GetUtcNow().AddSeconds(8));
        string heartbeat = Path.Combine(_folder, HeartbeatFile.FileName);
        string socketPath = Path.Combine(_folder, "notify.sock");
        using var systemd = new Socket(AddressFamily.Unix, SocketType.Dgram, ProtocolType.Unspecified);
        systemd.Bind(new UnixDomainSocketEndPoint(socketPath));
        using var notifier = SystemdNotifier.Create(socketPath)!;
        var loop = new OperationsLoop(new OperationsOptions(), health, metrics, new FixedFigures(), _clock, NullLogger.Instance, [heartbeat], notifier);

        var first = loop.Tick();
        Assert.True(first.Healthy);
        Assert.Equal(["WATCHDOG=1", "STATUS=healthy; queue 4; p95 7.8 s; rejected 25.0%; quarantined 1"], Drain(systemd));
        Assert.Equal(first.At, HeartbeatFile.TryRead(heartbeat)!.At);

        // The scheduler stops beating; 31 s later it counts as stalled.
        _clock.Advance(TimeSpan.FromSeconds(31));
        var stalled = loop.Tick();

        Assert.False(stalled.Healthy);
        Assert.Contains(stalled.Problems, p => p.StartsWith("scheduler silent for 31 s", StringComparison.Ordinal));
        Assert.Empty(Drain(systemd));
        var onDisk = HeartbeatFile.TryRead(heartbeat)!;
        Assert.Equal(first.At, onDisk.At); // not rewritten while unhealthy
        var (state, note) = ServiceState.Judge(onDisk, _clock.GetUtcNow(), staleAfter: TimeSpan.FromSeconds(30), _ => true);
        Assert.Equal(ServiceState.NotResponding, state);
        Assert.Equal(ExitCodes.ServiceUnhealthy, ServiceState.ExitCode(state, onDisk.Healthy));
        string text = StatusReport.Render(state, note, onDisk, _clock.GetUtcNow());
        Assert.Contains("NOT RESPONDING (heartbeat 31 s old", text, StringComparison.Ordinal);
        Assert.Contains("queue depth: 4 sets", text, StringComparison.Ordinal);
        Assert.Contains("median 6.0 s, 95th percentile 7.8 s", text, StringComparison.Ordinal);
        Assert.Contains("2 accepted (50.0%), 1 weak (25.0%), 1 rejected (25.0%)", text, StringComparison.Ordinal);
        Assert.Contains("stuck sets: 1", text, StringComparison.Ordinal);
        Assert.Contains("/in/bad.tif: 3 failed decode attempts", text, StringComparison.Ordinal);
        Assert.Contains("waiting for their files to settle: 1 sets", text, StringComparison.Ordinal);
        Assert.Contains("scans/b: 3 files, 1 still within the 10 s quiet period", text, StringComparison.Ordinal);
        string live = StatusReport.Render(ServiceState.Running, null, stalled, _clock.GetUtcNow());
        Assert.Contains("service: running, UNHEALTHY", live, StringComparison.Ordinal);
        Assert.Contains("problem: scheduler silent for 31 s", live, StringComparison.Ordinal);

        // The loop beats again: healthy, heartbeat and watchdog resume.
        health.Beat("scheduler");
        var recovered = loop.Tick();
        Assert.True(recovered.Healthy);
        Assert.Contains("WATCHDOG=1", Drain(systemd));
        Assert.Equal(recovered.At, HeartbeatFile.TryRead(heartbeat)!.At);
    }

    [Fact]
    public async Task Tick_FreeSpaceUnderThreshold_PausesIntakeWithMessageThenResumes()
    {
        var probe = new ScriptedProbe();
        var disk = new DiskSpaceGuard(probe, [_folder], pauseBelowBytes: 1L << 30, resumeMarginBytes: 512L << 20);
        var loop = new OperationsLoop(new OperationsOptions(), new HealthMonitor(_clock), new OperationsMetrics(), new NoServiceFigures(),
            _clock, NullLogger.Instance, [], disk: disk);

        Assert.False(loop.Tick().IntakePaused);
        await disk.WaitUntilOpenAsync(CancellationToken.None); // open: completes at once

        probe.Free = 700L << 20;
        var paused = loop.Tick();
        Assert.True(paused.IntakePaused);
        Assert.Contains("intake paused: 700 MiB free", paused.PauseReason, StringComparison.Ordinal);
        Assert.Contains("below the 1024 MiB threshold", paused.PauseReason, StringComparison.Ordinal);
        Assert.Contains("INTAKE PAUSED", StatusReport.Render(ServiceState.Running, null, paused, _clock.GetUtcNow()), StringComparison.Ordinal);
        var waiting = disk.WaitUntilOpenAsync(CancellationToken.None);

        probe.Free = 1200L << 20; // above the threshold but inside the margin: stays paused
        Assert.True(loop.Tick().IntakePaused);
        Assert.False(waiting.IsCompleted);

        probe.Free = 2L << 30;
        Assert.False(loop.Tick().IntakePaused);
        await waiting; // intake resumes
    }

    [Fact]
    public void WriteStopped_AfterBeats_HeartbeatSaysStoppedNotHealthyAndStatusSaysStopped()
    {
        string heartbeat = Path.Combine(_folder, HeartbeatFile.FileName);
        var loop = new OperationsLoop(new OperationsOptions(), new HealthMonitor(_clock), new OperationsMetrics(), new FixedFigures(),
            _clock, NullLogger.Instance, [heartbeat]);
        Assert.True(loop.Tick().Healthy);
        Assert.Equal(ServiceState.Running, ServiceState.Judge(HeartbeatFile.TryRead(heartbeat), _clock.GetUtcNow(), TimeSpan.FromSeconds(30), _ => true).State);

        loop.WriteStopped();
        _clock.Advance(TimeSpan.FromSeconds(31)); // a stop is still a stop after three beats, not a hang
        var onDisk = HeartbeatFile.TryRead(heartbeat)!;
        Assert.False(onDisk.Healthy);
        Assert.Equal("stopped", onDisk.State);
        var (state, _) = ServiceState.Judge(onDisk, _clock.GetUtcNow(), TimeSpan.FromSeconds(30), _ => true);
        Assert.Equal(ServiceState.Stopped, state);
        Assert.Equal(ExitCodes.ServiceNotRunning, ServiceState.ExitCode(state, onDisk.Healthy));
    }

    [Fact]
    public void Judge_StaleHeartbeatProcessGone_StoppedNotHungNoFileNotStarted()
    {
        var f = new OperationsFigures { At = _clock.GetUtcNow(), ProcessId = 1, Healthy = true };
        Assert.Equal(ServiceState.Stopped, ServiceState.Judge(f, _clock.GetUtcNow().AddMinutes(5), TimeSpan.FromSeconds(30), _ => false).State);
        Assert.Equal(ServiceState.NotResponding, ServiceState.Judge(f, _clock.GetUtcNow().AddMinutes(5), TimeSpan.FromSeconds(30), _ => null).State);
        Assert.Equal(ServiceState.Running, ServiceState.Judge(f, _clock.GetUtcNow().AddSeconds(5), TimeSpan.FromSeconds(30), _ => false).State);
        Assert.Equal(ServiceState.NotStarted, ServiceState.Judge(null, _clock.GetUtcNow(), TimeSpan.FromSeconds(30), _ => true).State);
        Assert.Equal(ExitCodes.Ok, ServiceState.ExitCode(ServiceState.Running, healthy: true));
        Assert.Equal(ExitCodes.ServiceUnhealthy, ServiceState.ExitCode(ServiceState.Running, healthy: false));
        Assert.Equal(ExitCodes.ServiceNotRunning, ServiceState.ExitCode(ServiceState.NotStarted, healthy: false));
    }

    [Fact]
    public void WatchdogPeriod_Environment_HalfIntervalForThisProcessOnly()
    {
        Assert.Equal(TimeSpan.FromSeconds(30), SystemdNotifier.WatchdogPeriod("60000000", null, 42));
        Assert.Equal(TimeSpan.FromSeconds(30), SystemdNotifier.WatchdogPeriod("60000000", "42", 42));
        Assert.Null(SystemdNotifier.WatchdogPeriod("60000000", "41", 42));
        Assert.Null(SystemdNotifier.WatchdogPeriod(null, null, 42));
        Assert.Null(SystemdNotifier.WatchdogPeriod("0", null, 42));
    }

    private static List<string> Drain(Socket socket)
    {
        var messages = new List<string>();
        var buffer = new byte[4096];
        while (socket.Available > 0)
        {
            int n = socket.Receive(buffer);
            messages.Add(Encoding.UTF8.GetString(buffer, 0, n));
        }
        return messages;
    }
}
