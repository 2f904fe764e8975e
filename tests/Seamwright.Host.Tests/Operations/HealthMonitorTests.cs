using Seamwright.Host.Operations;

namespace Seamwright.Host.Tests.Operations;

/// <summary>A loop's stall names why it cannot beat (the shared ledger unreachable), and only once it is too long.</summary>
public class HealthMonitorTests
{
    [Fact]
    public void Evaluate_LoopCannotBeat_StallNamesTheReasonOnlyPastItsLimitClearedByTheNextBeat()
    {
        var clock = new ManualClock(new DateTimeOffset(2026, 12, 4, 20, 0, 0, TimeSpan.Zero));
        var health = new HealthMonitor(clock);
        health.Register("ledger", TimeSpan.FromSeconds(4));
        health.CannotBeat("ledger", "the shared ledger is unreachable: connection refused");
        clock.Advance(TimeSpan.FromSeconds(3));
        Assert.True(health.Evaluate().Healthy); // within its limit: a reason alone is not a stall

        clock.Advance(TimeSpan.FromSeconds(3));
        var stalled = health.Evaluate();
        Assert.False(stalled.Healthy);
        Assert.Equal(["ledger silent for 6 s (limit 4 s): the shared ledger is unreachable: connection refused"], stalled.Problems);

        health.Beat("ledger");
        Assert.True(health.Evaluate().Healthy);
        clock.Advance(TimeSpan.FromSeconds(5));
        Assert.Equal(["ledger silent for 5 s (limit 4 s)"], health.Evaluate().Problems); // the old reason went with the beat
    }
}
