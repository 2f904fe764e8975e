using OpenCvSharp;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Tests.Imaging;

public class GaussianBlurTests
{
    [Theory]
    [InlineData(0.8)]
    [InlineData(1.6)]
    [InlineData(3.0)]
    public void Apply_NoiseImage_AgreesWithOpenCvGaussianBlur(double sigma)
    {
        // Reference: OpenCV cv::GaussianBlur with the same kernel length and replicated borders
        // (general-purpose reference library).
        var image = TestImages.Noise(80, 60, 7);
        var ours = GaussianBlur.Apply(image, sigma);
        int k = GaussianBlur.Kernel(sigma).Length;
        using var src = Mat.FromPixelData(image.Height, image.Width, MatType.CV_8UC1, image.Pixels);
        using var dst = new Mat();
        Cv2.GaussianBlur(src, dst, new Size(k, k), sigma, sigma, BorderTypes.Replicate);
        // OpenCV blurs 8-bit images in fixed point, so single pixels may differ by 2 levels.
        int worst = 0;
        double sum = 0;
        for (int y = 0; y < image.Height; y++)
        {
            for (int x = 0; x < image.Width; x++)
            {
                int d = Math.Abs(ours[x, y] - dst.At<byte>(y, x));
                worst = Math.Max(worst, d);
                sum += d;
            }
        }
        Assert.InRange(worst, 0, 2);
        Assert.True(sum / (image.Width * image.Height) < 0.25, $"mean difference {sum / (image.Width * image.Height)}");
    }

    [Fact]
    public void Kernel_AnySigma_SumsToOneAndIsSymmetric()
    {
        float[] kernel = GaussianBlur.Kernel(2.2);
        Assert.Equal(1.0, kernel.Sum(v => (double)v), 5);
        for (int i = 0; i < kernel.Length / 2; i++)
        {
            Assert.Equal(kernel[i], kernel[^(i + 1)]);
        }
    }

    [Fact]
    public void Apply_ConstantImage_StaysConstant()
    {
        var image = TestImages.Create(30, 20, (_, _) => 77);
        var blurred = GaussianBlur.Apply(image, 2.0);
        Assert.All(blurred.Pixels, v => Assert.Equal(77, v));
    }
}
