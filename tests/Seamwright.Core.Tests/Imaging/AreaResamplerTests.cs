using OpenCvSharp;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Tests.Imaging;

public class AreaResamplerTests
{
    [Fact]
    public void ToPixelBudget_ImageWithinBudget_ReturnsSameInstanceAtScaleOne()
    {
        var image = TestImages.Noise(40, 30, 1);
        var scaled = AreaResampler.ToPixelBudget(image, 1200);
        Assert.Same(image, scaled.Image);
        Assert.Equal(1.0, scaled.Scale);
    }

    [Theory]
    [InlineData(1000, 700, 100_000)]
    [InlineData(1234, 567, 50_000)]
    [InlineData(3001, 170, 20_000)]
    public void ToPixelBudget_LargeImage_FitsBudgetAndScaleMatchesSize(int w, int h, long budget)
    {
        var image = TestImages.Noise(w, h, 2);
        var scaled = AreaResampler.ToPixelBudget(image, budget);
        Assert.True((long)scaled.Image.Width * scaled.Image.Height <= budget);
        Assert.Equal((int)Math.Floor(w / scaled.Scale + 1e-9), scaled.Image.Width);
        Assert.Equal((int)Math.Floor(h / scaled.Scale + 1e-9), scaled.Image.Height);
        // Uses most of the budget (not needlessly small).
        Assert.True((long)scaled.Image.Width * scaled.Image.Height > budget * 0.9);
    }

    [Fact]
    public void Downscale_IntegerFactor_EqualsBlockMean()
    {
        var image = TestImages.Noise(60, 45, 3);
        var scaled = AreaResampler.Downscale(image, 3.0);
        Assert.Equal(20, scaled.Image.Width);
        Assert.Equal(15, scaled.Image.Height);
        for (int y = 0; y < 15; y++)
        {
            for (int x = 0; x < 20; x++)
            {
                int sum = 0;
                for (int dy = 0; dy < 3; dy++)
                {
                    for (int dx = 0; dx < 3; dx++)
                    {
                        sum += image[3 * x + dx, 3 * y + dy];
                    }
                }
                Assert.InRange(scaled.Image[x, y], Math.Round(sum / 9.0) - 1, Math.Round(sum / 9.0) + 1);
            }
        }
    }

    [Fact]
    public void Downscale_NonIntegerFactor_AgreesWithOpenCvAreaResize()
    {
        // Reference: OpenCV cv::resize with INTER_AREA (general-purpose reference library),
        // which also averages over exact pixel footprints for shrinking.
        var image = TestImages.Noise(250, 200, 4);
        var scaled = AreaResampler.Downscale(image, 2.5);
        using var src = Mat.FromPixelData(image.Height, image.Width, MatType.CV_8UC1, image.Pixels);
        using var dst = new Mat();
        Cv2.Resize(src, dst, new Size(scaled.Image.Width, scaled.Image.Height), 0, 0, InterpolationFlags.Area);
        int worst = 0;
        for (int y = 0; y < scaled.Image.Height; y++)
        {
            for (int x = 0; x < scaled.Image.Width; x++)
            {
                worst = Math.Max(worst, Math.Abs(scaled.Image[x, y] - dst.At<byte>(y, x)));
            }
        }
        Assert.InRange(worst, 0, 1);
    }

    [Fact]
    public void Downscale_FinePattern_DoesNotAlias()
    {
        // A one-pixel checkerboard must average to mid-gray; point sampling would give 0 or 255.
        var image = TestImages.Create(301, 301, (x, y) => ((x + y) & 1) == 0 ? 0 : 255);
        var scaled = AreaResampler.Downscale(image, 2.7);
        foreach (byte v in scaled.Image.Pixels)
        {
            Assert.InRange(v, 110, 145);
        }
    }

    [Fact]
    public void Downscale_Ramp_FollowsPixelCentreConvention()
    {
        // f(x) = x: the mean over a working pixel's footprint equals the source coordinate of its centre.
        var image = TestImages.Create(250, 10, (x, _) => x);
        double scale = 2.5;
        var scaled = AreaResampler.Downscale(image, scale);
        for (int x = 0; x < scaled.Image.Width; x++)
        {
            double expected = ScaledImage.ToSource(x, scale);
            Assert.InRange(scaled.Image[x, 2], expected - 0.51, expected + 0.51);
        }
        Assert.Equal(7.0, ScaledImage.ToSource(ScaledImage.ToWork(7.0, scale), scale), 12);
        var (tx, _) = scaled.WorkToSource.Apply(3, 0);
        Assert.Equal(ScaledImage.ToSource(3, scale), tx, 12);
    }
}
