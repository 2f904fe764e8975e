using Seamwright.Pipeline.Analysis;

namespace Seamwright.Pipeline.Tests.Analysis;

public class MemoryBudgetTests
{
    [Fact]
    public async Task Reserve_BeyondCapacity_WaitsUntilMemoryIsReleased()
    {
        var budget = new MemoryBudget(100);
        var first = budget.Reserve(70, CancellationToken.None);
        var second = Task.Run(() => budget.Reserve(50, CancellationToken.None));
        await Task.Delay(300);
        Assert.False(second.IsCompleted); // 70 + 50 > 100: must wait (a slow machine can only make this pass, never fail wrongly)
        Assert.Equal(70, budget.Used);
        first.Dispose();
        var reservation = await second.WaitAsync(TimeSpan.FromSeconds(30));
        Assert.Equal(50, budget.Used);
        reservation.Dispose();
        Assert.Equal(0, budget.Used);
    }

    [Fact]
    public void Reserve_LargerThanWholeBudget_AllowedWhenAlone()
    {
        var budget = new MemoryBudget(100);
        using (budget.Reserve(500, CancellationToken.None))
        {
            Assert.Equal(500, budget.Used);
        }
        Assert.Equal(0, budget.Used);
    }

    [Fact]
    public void Reserve_Cancelled_ThrowsInsteadOfWaitingForever()
    {
        var budget = new MemoryBudget(100);
        using var held = budget.Reserve(100, CancellationToken.None);
        using var cts = new CancellationTokenSource();
        cts.Cancel();
        Assert.Throws<OperationCanceledException>(() => budget.Reserve(10, cts.Token));
    }
}
