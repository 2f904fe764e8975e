using Seamwright.Core.Features;
using Seamwright.Core.Imaging;
using Seamwright.Core.Synthetic;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Features;

public class NoiseFloorTests(ITestOutputHelper output)
{
    [Theory]
    [InlineData(0.5)]
    [InlineData(2.0)]
    [InlineData(6.0)]
    [InlineData(12.0)]
    [InlineData(20.0)]
    public void Extract_BlankPaperWithNoise_NoCorners(double sigma)
    {
        var blank = ImageEffects.AddGaussianNoise(ImageEffects.Blank(1200, 900, 200), sigma, 4);
        var features = OrientedCornerExtractor.Extract(blank, null, new CornerDetectorOptions());
        output.WriteLine($"sigma {sigma}: {features.Count} corners");
        Assert.True(features.Count <= 5, $"{features.Count} corners on blank paper with noise {sigma}");
    }

    [Fact]
    public void Estimate_WhiteNoise_RecoversSigma()
    {
        var img = ImageEffects.AddGaussianNoise(ImageEffects.Blank(600, 400, 128), 5.0, 7);
        double sigma = NoiseLevel.Estimate(img.Pixels, img.Width, img.Height);
        Assert.InRange(sigma, 4.5, 5.5);
    }
}
