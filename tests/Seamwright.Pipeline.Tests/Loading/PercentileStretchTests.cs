using Seamwright.Core.Imaging;

namespace Seamwright.Pipeline.Tests.Loading;

public class PercentileStretchTests
{
    [Fact]
    public void FindRange_Uniform_ReturnsPercentileValues()
    {
        ushort[] samples = [.. Enumerable.Range(0, 10000).Select(i => (ushort)i)];
        var range = PercentileStretch.FindRange(samples, 1, 99);
        Assert.Equal(100, range.Low);
        Assert.Equal(9899, range.High);
    }

    [Fact]
    public void Apply_FlatImage_MapsToPlainEightBitValue()
    {
        ushort[] samples = [.. Enumerable.Repeat((ushort)25700, 50)];
        var range = PercentileStretch.FindRange(samples, 0.1, 99.9);
        var output = new byte[50];
        PercentileStretch.Apply(samples, range, output);
        Assert.All(output, v => Assert.Equal(100, v));
    }
}
