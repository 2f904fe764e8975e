using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Tests.Imaging;

public class ImageWarperTests
{
    [Fact]
    public void Warp_IntegerTranslation_ShiftsPixels()
    {
        var image = TestImages.Noise(50, 40, 11);
        var shifted = ImageWarper.Warp(image, Transform2D.Translation(3, -2), 50, 40, fill: 7);
        Assert.Equal(image[10, 12], shifted[13, 10]);
        Assert.Equal(image[0, 2], shifted[3, 0]);
        Assert.Equal(7, shifted[1, 5]);
        Assert.Equal(7, shifted[20, 39]);
    }

    [Fact]
    public void Warp_ThereAndBack_RestoresInterior()
    {
        var image = GaussianBlur.Apply(TestImages.Noise(120, 100, 12), 1.5);
        double a = 0.3;
        var h = new Transform2D(Math.Cos(a), -Math.Sin(a), 40, Math.Sin(a), Math.Cos(a), -10, 0.0004, 0.0002, 1);
        var warped = ImageWarper.Warp(image, h, 200, 200);
        var back = ImageWarper.Warp(warped, h.Inverse(), 120, 100);
        var mask = new GrayImage(120, 100);
        _ = ImageWarper.Warp(warped, h.Inverse(), 120, 100, 0, mask);
        double sum = 0;
        int n = 0;
        for (int y = 5; y < 95; y++)
        {
            for (int x = 5; x < 115; x++)
            {
                if (mask[x, y] == 255 && InsideAfterWarp(h, x, y))
                {
                    sum += Math.Abs(image[x, y] - back[x, y]);
                    n++;
                }
            }
        }
        Assert.True(n > 5000, $"only {n} pixels compared");
        Assert.True(sum / n < 3.0, $"mean abs diff {sum / n}");
    }

    private static bool InsideAfterWarp(Transform2D h, int x, int y)
    {
        var (u, v) = h.Apply(x, y);
        return u > 2 && v > 2 && u < 197 && v < 197;
    }

    [Fact]
    public void Warp_Identity_ReturnsEqualImage()
    {
        var image = TestImages.Noise(31, 17, 13);
        var same = ImageWarper.Warp(image, Transform2D.Identity, 31, 17);
        Assert.Equal(image.Pixels, same.Pixels);
    }
}
