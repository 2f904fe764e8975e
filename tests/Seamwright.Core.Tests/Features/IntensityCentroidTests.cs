using Seamwright.Core.Estimation;
using Seamwright.Core.Features;

namespace Seamwright.Core.Tests.Features;

public class IntensityCentroidTests
{
    [Fact]
    public void Angle_VectorPath_MatchesPlainPathExactly()
    {
        const int W = 71, H = 64;
        var rng = new SplitMix64Stream(0x1C_0001UL);
        var image = new byte[W * H];
        for (int i = 0; i < image.Length; i++)
        {
            image[i] = (byte)(rng.NextDouble() * 256);
        }
        for (int cy = IntensityCentroid.Radius; cy < H - IntensityCentroid.Radius; cy += 3)
        {
            for (int cx = IntensityCentroid.Radius; cx < W - IntensityCentroid.Radius; cx += 3)
            {
                Assert.Equal(IntensityCentroid.AnglePlain(image, W, cx, cy), IntensityCentroid.Angle(image, W, cx, cy));
            }
        }
    }

    [Fact]
    public void Angle_BrightSideToTheRight_PointsAlongPositiveX()
    {
        const int W = 40, H = 40;
        var image = new byte[W * H];
        for (int y = 0; y < H; y++)
        {
            for (int x = 20; x < W; x++)
            {
                image[y * W + x] = 200;
            }
        }
        Assert.Equal(0f, IntensityCentroid.Angle(image, W, 20, 20), 3);
    }
}
