using Seamwright.Core.Estimation;
using Seamwright.Core.Features;

namespace Seamwright.Core.Tests.Features;

public class BinaryDescriptorTests
{
    [Fact]
    public void Compute_EmbeddedPatternFastPath_MatchesTestByTestPathBitForBit()
    {
        const int W = 97, H = 83;
        var rng = new SplitMix64Stream(0xD35C_0001UL);
        var image = new byte[W * H];
        for (int i = 0; i < image.Length; i++)
        {
            // Coarse values so that many comparisons are ties (equal pixels must give 0 on both paths).
            image[i] = (byte)(rng.NextDouble() * 8 * 32);
        }
        var smoothed = GaussianSmoother.Smooth(image, W, H, DescriptorPatternGenerator.SmoothingSigma, DescriptorPatternGenerator.SmoothingRadius);
        int checkedCount = 0;
        for (int k = 0; k < 400; k++)
        {
            int margin = BinaryDescriptor.Reach + 2;
            int cx = margin + (int)(rng.NextDouble() * (W - 2 * margin));
            int cy = margin + (int)(rng.NextDouble() * (H - 2 * margin));
            // Every 8th angle is a multiple of 45 degrees, where rotated offsets land on halves and rounding ties matter.
            float angle = k % 8 == 0 ? (float)(k / 8 % 8 * Math.PI / 4 - Math.PI) : (float)((rng.NextDouble() * 2 - 1) * Math.PI);
            var fast = BinaryDescriptor.Compute(smoothed, W, cx, cy, angle);
            var plain = BinaryDescriptor.Compute(smoothed, W, cx, cy, angle, DescriptorPattern.Points);
            Assert.Equal(plain, fast);
            checkedCount++;
        }
        Assert.Equal(400, checkedCount);
    }
}
