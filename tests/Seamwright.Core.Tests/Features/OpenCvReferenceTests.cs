using Seamwright.Core.Estimation;
using System.Runtime.InteropServices;
using OpenCvSharp;
using Seamwright.Core.Features;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Features;

/// <summary>Checks against the general-purpose reference library OpenCV (through OpenCvSharp4) on the same inputs.</summary>
public class OpenCvReferenceTests
{
    private const int W = 161, H = 97;

    private static byte[] Scene()
    {
        var img = ImageEffects.AddGaussianNoise(
            SceneRenderer.Render(new ProceduralScene(11, SceneStyle.EstateMap), W, H, Transform2D.Scaling(1 / 0.7, 1 / 0.7)), 3, 5);
        return img.Pixels;
    }

    [Theory]
    [InlineData(3)]
    [InlineData(5)]
    [InlineData(7)]
    public void Compute_Harris_MatchesOpenCvCornerHarris(int blockSize)
    {
        var pixels = Scene();
        var ours = new float[W * H];
        CornerResponse.Compute(pixels, W, H, blockSize, 0.04, ours, Span<float>.Empty);
        using var src = Mat.FromPixelData(H, W, MatType.CV_8UC1, pixels);
        using var dst = new Mat();
        // Reference: OpenCV cv::cornerHarris (Sobel aperture 3, default reflect-101 border).
        Cv2.CornerHarris(src, dst, blockSize, 3, 0.04);
        AssertClose(ours, dst);
    }

    [Theory]
    [InlineData(3)]
    [InlineData(5)]
    public void Compute_MinEigen_MatchesOpenCvCornerMinEigenVal(int blockSize)
    {
        var pixels = Scene();
        var ours = new float[W * H];
        CornerResponse.Compute(pixels, W, H, blockSize, 0.04, Span<float>.Empty, ours);
        using var src = Mat.FromPixelData(H, W, MatType.CV_8UC1, pixels);
        using var dst = new Mat();
        // Reference: OpenCV cv::cornerMinEigenVal (Sobel aperture 3, default reflect-101 border).
        Cv2.CornerMinEigenVal(src, dst, blockSize, 3);
        AssertClose(ours, dst);
    }

    [Fact]
    public void Hamming_RandomDescriptors_MatchesOpenCvNormHamming()
    {
        var rng = new SplitMix64Stream(42);
        for (int t = 0; t < 200; t++)
        {
            var a = new Descriptor256(rng.Next(), rng.Next(), rng.Next(), rng.Next());
            var b = t % 3 == 0 ? a with { W2 = a.W2 ^ rng.Next() } : new Descriptor256(rng.Next(), rng.Next(), rng.Next(), rng.Next());
            var ba = MemoryMarshal.AsBytes(new[] { a }.AsSpan()).ToArray();
            var bb = MemoryMarshal.AsBytes(new[] { b }.AsSpan()).ToArray();
            using var ma = Mat.FromPixelData(1, 32, MatType.CV_8UC1, ba);
            using var mb = Mat.FromPixelData(1, 32, MatType.CV_8UC1, bb);
            // Reference: OpenCV cv::norm with NORM_HAMMING over the same 32 bytes.
            Assert.Equal((int)Cv2.Norm(ma, mb, NormTypes.Hamming), Descriptor256.Hamming(a, b));
        }
    }

    private static void AssertClose(float[] ours, Mat reference)
    {
        reference.GetArray(out float[] theirs);
        float peak = theirs.Max(Math.Abs);
        Assert.True(peak > 0);
        for (int i = 0; i < ours.Length; i++)
        {
            Assert.True(Math.Abs(ours[i] - theirs[i]) <= 1e-4f * peak + 1e-12f,
                $"pixel ({i % W}, {i / W}): ours {ours[i]:G6}, OpenCV {theirs[i]:G6}, peak {peak:G6}");
        }
    }
}
