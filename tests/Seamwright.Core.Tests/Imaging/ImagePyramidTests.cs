using Seamwright.Core.Imaging;

namespace Seamwright.Core.Tests.Imaging;

public class ImagePyramidTests
{
    [Fact]
    public void Build_SqrtTwoStep_LevelsHaveExactCumulativeScale()
    {
        var image = TestImages.Noise(400, 300, 9);
        var pyramid = ImagePyramid.Build(image, new PyramidOptions(Math.Sqrt(2), MaxLevels: 20, MinSide: 40));
        Assert.Same(image, pyramid[0].Image);
        for (int k = 1; k < pyramid.Count; k++)
        {
            Assert.Equal(Math.Pow(Math.Sqrt(2), k), pyramid[k].Scale, 9);
            Assert.True(pyramid[k].Image.Width < pyramid[k - 1].Image.Width);
            Assert.True(Math.Min(pyramid[k].Image.Width, pyramid[k].Image.Height) >= 40);
        }
        // 300 / sqrt(2)^6 = 37.5 < 40, so levels 0..5.
        Assert.Equal(6, pyramid.Count);
    }

    [Fact]
    public void Build_Ramp_LevelCoordinatesMapBackToBase()
    {
        var image = TestImages.Create(256, 16, (x, _) => x);
        var pyramid = ImagePyramid.Build(image, new PyramidOptions(2.0, MaxLevels: 4, MinSide: 2));
        Assert.Equal(4, pyramid.Count);
        for (int k = 1; k < pyramid.Count; k++)
        {
            var level = pyramid[k];
            for (int x = 0; x < level.Image.Width; x++)
            {
                double expected = level.ToSource(x);
                Assert.InRange(level.Image[x, level.Image.Height / 2], expected - 0.51 * k, expected + 0.51 * k);
            }
        }
    }

    [Fact]
    public void Build_BadStep_Throws() =>
        Assert.Throws<ArgumentOutOfRangeException>(() => ImagePyramid.Build(TestImages.Noise(10, 10, 1), new PyramidOptions(1.0)));
}
