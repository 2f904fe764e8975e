using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Tests.Sets;

public class SetCompletionPolicyTests
{
    private static readonly DateTime T0 = new(2026, 12, 1, 12, 0, 0, DateTimeKind.Utc);

    [Fact]
    public void Decide_QuietPeriodNotOver_Waits()
    {
        var s = new CompletionSettings { QuietSeconds = 10 };
        var (d, _) = SetCompletionPolicy.Decide(s, new SetSnapshot(5, 0, T0, T0.AddSeconds(5), false), T0.AddSeconds(12));
        Assert.Equal(CompletionDecision.Wait, d);
    }

    [Fact]
    public void Decide_QuietPeriodOver_Complete()
    {
        var s = new CompletionSettings { QuietSeconds = 10 };
        var (d, _) = SetCompletionPolicy.Decide(s, new SetSnapshot(5, 0, T0, T0.AddSeconds(5), false), T0.AddSeconds(15));
        Assert.Equal(CompletionDecision.Complete, d);
    }

    [Fact]
    public void Decide_UnstableFile_WaitsEvenWhenQuiet()
    {
        var s = new CompletionSettings { QuietSeconds = 0 };
        var (d, _) = SetCompletionPolicy.Decide(s, new SetSnapshot(5, 1, T0, T0, false), T0.AddSeconds(100));
        Assert.Equal(CompletionDecision.Wait, d);
    }

    [Fact]
    public void Decide_MarkerConfiguredAndAbsent_WaitsThenOverdue()
    {
        var s = new CompletionSettings { ReadyMarker = "READY", MaxWaitSeconds = 60 };
        Assert.Equal(CompletionDecision.Wait, SetCompletionPolicy.Decide(s, new SetSnapshot(3, 0, T0, T0, false), T0.AddSeconds(59)).Decision);
        Assert.Equal(CompletionDecision.Overdue, SetCompletionPolicy.Decide(s, new SetSnapshot(3, 0, T0, T0, false), T0.AddSeconds(60)).Decision);
        Assert.Equal(CompletionDecision.Complete, SetCompletionPolicy.Decide(s, new SetSnapshot(3, 0, T0, T0, true), T0.AddSeconds(1)).Decision);
    }

    [Fact]
    public void Decide_ExpectedCountReached_CompleteWithoutQuiet()
    {
        var s = new CompletionSettings { ExpectedCount = 4, QuietSeconds = 1000 };
        Assert.Equal(CompletionDecision.Wait, SetCompletionPolicy.Decide(s, new SetSnapshot(3, 0, T0, T0, false), T0.AddSeconds(1)).Decision);
        Assert.Equal(CompletionDecision.Complete, SetCompletionPolicy.Decide(s, new SetSnapshot(4, 0, T0, T0, false), T0.AddSeconds(1)).Decision);
    }

    [Fact]
    public void Decide_OverdueWithStillChangingFile_ProcessesTheStableOnes()
    {
        var s = new CompletionSettings { MaxWaitSeconds = 30 };
        Assert.Equal(CompletionDecision.Overdue, SetCompletionPolicy.Decide(s, new SetSnapshot(3, 1, T0, T0.AddSeconds(29), false), T0.AddSeconds(31)).Decision);
    }
}
