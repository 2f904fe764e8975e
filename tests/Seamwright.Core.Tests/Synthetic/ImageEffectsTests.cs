using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Synthetic;

public class ImageEffectsTests
{
    [Fact]
    public void AddGaussianNoise_MidGray_HasRequestedSpreadAndIsSeeded()
    {
        var blank = ImageEffects.Blank(200, 200, 128);
        var noisy = ImageEffects.AddGaussianNoise(blank, 5.0, 99);
        double mean = noisy.Pixels.Average(v => (double)v);
        double std = Math.Sqrt(noisy.Pixels.Average(v => (v - mean) * (v - mean)));
        Assert.InRange(mean, 127.9, 128.1);
        // Rounding to integers adds 1/12 gray level^2 of variance.
        Assert.InRange(std, 4.9, 5.15);
        Assert.Equal(noisy.Pixels, ImageEffects.AddGaussianNoise(blank, 5.0, 99).Pixels);
        Assert.NotEqual(noisy.Pixels, ImageEffects.AddGaussianNoise(blank, 5.0, 100).Pixels);
    }

    [Fact]
    public void AdjustBrightnessContrast_KnownValues_MapLinearlyAndClamp()
    {
        var image = new Seamwright.Core.Imaging.GrayImage(4, 1, [0, 100, 200, 255]);
        var result = ImageEffects.AdjustBrightnessContrast(image, 1.5, 10);
        // (v - 127.5) 1.5 + 137.5
        Assert.Equal(new byte[] { 0, 96, 246, 255 }, result.Pixels);
    }

    [Fact]
    public void PeriodicPattern_AnyPixel_RepeatsWithPeriod()
    {
        var image = ImageEffects.PeriodicPattern(200, 150, 48, 3);
        for (int y = 0; y < 150 - 48; y += 7)
        {
            for (int x = 0; x < 200 - 48; x += 5)
            {
                Assert.Equal(image[x, y], image[x + 48, y]);
                Assert.Equal(image[x, y], image[x, y + 48]);
            }
        }
        double mean = image.Pixels.Average(v => (double)v);
        Assert.True(image.Pixels.Average(v => Math.Abs(v - mean)) > 5, "the tile should be textured");
    }
}
