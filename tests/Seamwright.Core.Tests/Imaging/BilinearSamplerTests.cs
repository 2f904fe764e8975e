using Seamwright.Core.Imaging;

namespace Seamwright.Core.Tests.Imaging;

public class BilinearSamplerTests
{
    private static readonly GrayImage Image = TestImages.Create(3, 2, (x, y) => 10 * x + 100 * y);

    [Fact]
    public void TrySample_IntegerPosition_ReturnsPixel()
    {
        Assert.True(BilinearSampler.TrySample(Image, 2, 1, out float v));
        Assert.Equal(120f, v);
    }

    [Fact]
    public void TrySample_BetweenPixels_InterpolatesLinearly()
    {
        Assert.True(BilinearSampler.TrySample(Image, 0.25, 0.5, out float v));
        Assert.Equal(2.5f + 50f, v, 4);
    }

    [Theory]
    [InlineData(-0.01, 0)]
    [InlineData(2.01, 0)]
    [InlineData(0, 1.5)]
    [InlineData(double.NaN, 0)]
    public void TrySample_OutsideOrNaN_ReturnsFalse(double x, double y) =>
        Assert.False(BilinearSampler.TrySample(Image, x, y, out _));

    [Fact]
    public void SampleClamped_Outside_ReplicatesEdge() =>
        Assert.Equal(120f, BilinearSampler.SampleClamped(Image, 9, 9));
}
