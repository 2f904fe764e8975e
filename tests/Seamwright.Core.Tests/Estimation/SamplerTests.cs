using Seamwright.Core.Estimation;

namespace Seamwright.Core.Tests.Estimation;

public class SamplerTests
{
    [Fact]
    public void ProsacDraw_FirstSample_IsTheTopRankedMatches()
    {
        var s = new ProsacSampler(1, 100, 4, 10_000);
        Span<int> sample = stackalloc int[4];
        s.Draw(sample);
        Assert.Equal(new[] { 0, 1, 2, 3 }, sample.ToArray().Order());
    }

    [Fact]
    public void ProsacDraw_EarlySamples_StayInTheGrowingTopSubset()
    {
        var s = new ProsacSampler(3, 1000, 4, 10_000);
        Span<int> sample = stackalloc int[4];
        for (int t = 0; t < 200; t++)
        {
            s.Draw(sample);
            int n = s.SubsetSize;
            Assert.Contains(n - 1, sample.ToArray());
            Assert.All(sample.ToArray(), i => Assert.InRange(i, 0, n - 1));
            Assert.Equal(4, sample.ToArray().Distinct().Count());
        }
        Assert.True(s.SubsetSize < 1000, "after 200 of 10000 samples PROSAC still draws from a top subset");
    }

    [Fact]
    public void ProsacDraw_BeyondGrowthHorizon_IsUniformOverAll()
    {
        var s = new ProsacSampler(5, 30, 2, 50);
        Span<int> sample = stackalloc int[2];
        for (int t = 0; t < 100; t++)
        {
            s.Draw(sample);
        }
        Assert.True(s.IsUniform);
        var seen = new HashSet<int>();
        for (int t = 0; t < 2000; t++)
        {
            s.Draw(sample);
            seen.UnionWith(sample.ToArray());
        }
        Assert.Equal(30, seen.Count);
    }

    [Fact]
    public void UniformDraw_SameSeed_SameSamples()
    {
        var a = new UniformSampler(9, 50);
        var b = new UniformSampler(9, 50);
        Span<int> x = stackalloc int[4];
        Span<int> y = stackalloc int[4];
        for (int i = 0; i < 100; i++)
        {
            a.Draw(x);
            b.Draw(y);
            Assert.True(x.SequenceEqual(y));
            Assert.Equal(4, x.ToArray().Distinct().Count());
        }
    }
}
