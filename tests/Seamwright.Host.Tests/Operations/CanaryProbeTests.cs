using Seamwright.Host.Operations;

namespace Seamwright.Host.Tests.Operations;

/// <summary>A real FileSystemWatcher feeding the canary; the stall is injected by silencing it.</summary>
public sealed class CanaryProbeTests : IDisposable
{
    private readonly string _root = Directory.CreateTempSubdirectory("sw-canary-").FullName;
    private readonly ManualClock _clock = new(new DateTimeOffset(2026, 12, 1, 0, 0, 0, TimeSpan.Zero));

    public void Dispose() => Directory.Delete(_root, true);

    /// <summary>A minimal watcher like the service's: events are hints passed to the probe; restart recreates it.</summary>
    private sealed class TestWatcher : IWatcherControl, IDisposable
    {
        private readonly string _root;
        private FileSystemWatcher _watcher;

        public TestWatcher(string root)
        {
            _root = root;
            _watcher = Create();
        }

        public CanaryProbe? Probe { get; set; }

        public int Restarts { get; private set; }

        public bool Deaf
        {
            set => _watcher.EnableRaisingEvents = !value;
        }

        public void RestartAndRescan(string root)
        {
            Restarts++;
            _watcher.Dispose();
            _watcher = Create();
        }

        public void Dispose() => _watcher.Dispose();

        private FileSystemWatcher Create()
        {
            var w = new FileSystemWatcher(_root) { NotifyFilter = NotifyFilters.FileName | NotifyFilters.LastWrite | NotifyFilters.Size };
            w.Changed += (_, e) => Probe?.Observed(_root, e.FullPath);
            w.Created += (_, e) => Probe?.Observed(_root, e.FullPath);
            w.EnableRaisingEvents = true;
            return w;
        }
    }

    [Fact]
    public void Tick_WatcherGoesDeaf_RecreatedAndCanaryDeliveredAgain()
    {
        using var watcher = new TestWatcher(_root);
        var probe = new CanaryProbe([_root], watcher, _clock, deadline: TimeSpan.FromSeconds(60));
        watcher.Probe = probe;

        Assert.Empty(probe.Tick()); // writes canary 1
        Assert.True(WaitUntil(() => probe.States()[0].LastDelivered is not null), "a live watcher delivers the canary");
        _clock.Advance(TimeSpan.FromSeconds(60));
        Assert.Empty(probe.Tick()); // delivered: no complaint, canary 2 written
        Assert.True(WaitUntil(() => probe.States()[0].LastDelivered == _clock.GetUtcNow()));

        watcher.Deaf = true; // injected stall: events stop
        _clock.Advance(TimeSpan.FromSeconds(60));
        Assert.Empty(probe.Tick()); // canary 3 written, nobody hears it
        _clock.Advance(TimeSpan.FromSeconds(30));
        Assert.Empty(probe.Tick()); // inside the deadline: wait
        Assert.False(probe.States()[0].Overdue);
        _clock.Advance(TimeSpan.FromSeconds(30));
        Assert.True(probe.States()[0].Overdue);
        var notes = probe.Tick();

        Assert.Equal(1, watcher.Restarts);
        Assert.Contains("did not report its canary within 60 s", Assert.Single(notes), StringComparison.Ordinal);
        Assert.Equal(1, probe.States()[0].Failures);
        Assert.True(WaitUntil(() => probe.States()[0].LastDelivered == _clock.GetUtcNow()), "the recreated watcher delivers the next canary");
        Assert.False(probe.States()[0].Overdue);
    }

    [Fact]
    public void Observed_OtherFileOrRoot_Ignored()
    {
        using var watcher = new TestWatcher(_root);
        var probe = new CanaryProbe([_root], watcher, _clock, TimeSpan.FromSeconds(60));
        probe.Observed(_root, Path.Combine(_root, "image.png"));
        probe.Observed("/elsewhere", Path.Combine("/elsewhere", CanaryProbe.FileName));
        Assert.Null(probe.States()[0].LastDelivered);
        Assert.True(CanaryProbe.IsCanary(Path.Combine(_root, "sub", CanaryProbe.FileName)));
    }

    /// <summary>Waits for a file-system event to arrive (no duration is asserted; 20 s is only a give-up point).</summary>
    private static bool WaitUntil(Func<bool> condition)
    {
        var giveUp = DateTime.UtcNow.AddSeconds(20);
        while (!condition())
        {
            if (DateTime.UtcNow > giveUp)
            {
                return false;
            }
            Thread.Sleep(20);
        }
        return true;
    }
}
