using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Synthetic;

public class SyntheticRandomTests
{
    [Fact]
    public void NextGaussian_ManyDraws_HasUnitVarianceAndZeroMean()
    {
        var rng = new SyntheticRandom(42);
        double sum = 0;
        double sumSq = 0;
        const int n = 200_000;
        for (int i = 0; i < n; i++)
        {
            double g = rng.NextGaussian();
            sum += g;
            sumSq += g * g;
        }
        Assert.InRange(sum / n, -0.01, 0.01);
        Assert.InRange(sumSq / n, 0.98, 1.02);
    }

    [Fact]
    public void NextDouble_SameSeed_SameSequence()
    {
        var a = new SyntheticRandom(7);
        var b = new SyntheticRandom(7);
        var c = new SyntheticRandom(8);
        double[] sa = [.. Enumerable.Range(0, 5).Select(_ => a.NextDouble())];
        Assert.Equal(sa, Enumerable.Range(0, 5).Select(_ => b.NextDouble()));
        Assert.NotEqual(sa, Enumerable.Range(0, 5).Select(_ => c.NextDouble()));
    }
}
