using Seamwright.Core.Estimation;

namespace Seamwright.Core.Tests.Estimation;

public class TerminationBoundTests
{
    // Hartley and Zisserman, Multiple View Geometry (2nd ed.), Table 4.3, row s = 4, p = 0.99
    // (values from memory).
    [Theory]
    [InlineData(0.05, 3)]
    [InlineData(0.10, 5)]
    [InlineData(0.20, 9)]
    [InlineData(0.25, 13)]
    [InlineData(0.30, 17)]
    [InlineData(0.40, 34)]
    [InlineData(0.50, 72)]
    public void Samples_SampleSizeFourConfidence99_MatchesHartleyZissermanTable43(double outlierRatio, int expected)
    {
        Assert.Equal(expected, TerminationBound.Samples(0.99, 1 - outlierRatio, 4, 1_000_000));
    }

    [Fact]
    public void Samples_NoInliers_ReturnsCap() => Assert.Equal(500, TerminationBound.Samples(0.99, 0, 4, 500));

    [Fact]
    public void Samples_AllInliers_ReturnsOne() => Assert.Equal(1, TerminationBound.Samples(0.99, 1, 4, 500));

    [Fact]
    public void Samples_BoundAboveCap_ReturnsCap() => Assert.Equal(100, TerminationBound.Samples(0.99, 0.1, 4, 100));

    [Fact]
    public void Samples_MoreInliers_NeverMoreSamples()
    {
        int previous = int.MaxValue;
        for (double w = 0.05; w <= 1.0; w += 0.05)
        {
            int n = TerminationBound.Samples(0.99, w, 4, 1_000_000);
            Assert.True(n <= previous, $"bound rose at inlier ratio {w}");
            previous = n;
        }
    }
}
