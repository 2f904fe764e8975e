namespace Seamwright.Host.Tests.Operations;

/// <summary>A clock the test moves by hand (timers are not used by the code under test here).</summary>
internal sealed class ManualClock(DateTimeOffset start) : TimeProvider
{
    private DateTimeOffset _now = start;

    public override DateTimeOffset GetUtcNow() => _now;

    public void Advance(TimeSpan by) => _now += by;
}
