using Seamwright.Host.Operations;

namespace Seamwright.Host.Tests.Operations;

/// <summary>Changes a periodic rescan found are missed events only when the watcher never reports them within the grace period.</summary>
public sealed class MissedEventDetectorTests
{
    private readonly ManualClock _clock = new(new DateTimeOffset(2026, 12, 1, 0, 0, 0, TimeSpan.Zero));

    [Fact]
    public void Due_SuspectNeverReported_CountedOnceAndWatcherRecreated()
    {
        var d = new MissedEventDetector(["/in/a", "/in/b"], _clock, TimeSpan.FromSeconds(5));
        d.Suspect(1, "/in/b/s/x.png");
        d.Suspect(1, "/in/b/s/y.png");
        _clock.Advance(TimeSpan.FromSeconds(4));
        Assert.Empty(d.Due()); // the event may still be in flight

        _clock.Advance(TimeSpan.FromSeconds(1));
        var due = Assert.Single(d.Due());
        Assert.Equal((1, 2, "/in/b/s/x.png"), due);
        Assert.Empty(d.Due()); // cleared once counted
        var states = d.States();
        Assert.Equal(0, states[0].MissedEvents);
        Assert.Equal(2, states[1].MissedEvents);
        Assert.Equal(1, states[1].Recreated);
        Assert.Equal("/in/b/s/x.png", states[1].LastMissedPath);
    }

    [Fact]
    public void Due_EventArrivesAfterTheRescan_NotMissed()
    {
        var d = new MissedEventDetector(["/in/a"], _clock, TimeSpan.FromSeconds(5));
        d.Suspect(0, "/in/a/s/x.png");
        d.Reported(0, "/in/a/s/x.png");
        _clock.Advance(TimeSpan.FromSeconds(60));
        Assert.Empty(d.Due());
        Assert.Equal(0, d.States()[0].Recreated);
    }

    [Fact]
    public void Due_SilentSpellSpanningTwoRescans_RecreatesOnceAndClearsTheYoungerSuspectsOfThatRootOnly()
    {
        var d = new MissedEventDetector(["/in/a", "/in/b"], _clock, TimeSpan.FromSeconds(5));
        d.Suspect(0, "/in/a/s/x.png");
        _clock.Advance(TimeSpan.FromSeconds(3));
        d.Suspect(0, "/in/a/s/y.png"); // found by the next rescan, still under the silent watcher
        d.Suspect(1, "/in/b/s/z.png");
        _clock.Advance(TimeSpan.FromSeconds(2));
        Assert.Equal((0, 1, "/in/a/s/x.png"), Assert.Single(d.Due()));
        _clock.Advance(TimeSpan.FromSeconds(60));
        Assert.Equal((1, 1, "/in/b/s/z.png"), Assert.Single(d.Due())); // the other root keeps its own
        var states = d.States();
        Assert.Equal(1, states[0].Recreated);
        Assert.Equal(1, states[0].MissedEvents);
        Assert.Equal(1, states[1].Recreated);
    }

    [Fact]
    public void Suspect_WatcherReportedThePathJustBeforeTheRescan_NotSuspected()
    {
        var d = new MissedEventDetector(["/in/a"], _clock, TimeSpan.FromSeconds(5));
        d.Reported(0, "/in/a/s/x.png");
        _clock.Advance(TimeSpan.FromSeconds(1));
        d.Suspect(0, "/in/a/s/x.png");
        _clock.Advance(TimeSpan.FromSeconds(60));
        Assert.Empty(d.Due());
        d.Suspect(0, "/in/a/s/x.png"); // a later change the watcher did not report is one again
        _clock.Advance(TimeSpan.FromSeconds(5));
        Assert.Single(d.Due());
    }
}
