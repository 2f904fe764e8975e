using Seamwright.Core.Cameras;

namespace Seamwright.Core.Tests.Cameras;

public class LensDistortionTests
{
    [Theory]
    [InlineData(-0.1, 0, 0.6, -0.4)]
    [InlineData(0.05, -0.01, -0.7, 0.3)]
    [InlineData(-0.2, 0.03, 0.1, 0.9)]
    public void Undistort_OfDistort_GivesThePointBack(double k1, double k2, double x, double y)
    {
        var lens = new LensDistortion(k1, k2);
        var (dx, dy) = lens.Distort(x, y);
        var (ux, uy) = lens.Undistort(dx, dy);
        Assert.Equal(x, ux, 12);
        Assert.Equal(y, uy, 12);
    }

    [Fact]
    public void Distort_Barrel_PullsTowardsTheCentre()
    {
        // Brown's polynomial with k1 < 0 (barrel): r_d = r (1 + k1 r^2) = 0.8 (1 - 0.1 x 0.64).
        var (x, y) = new LensDistortion(-0.1, 0).Distort(0.8, 0);
        Assert.Equal(0.8 * (1 - 0.064), x, 12);
        Assert.Equal(0, y);
    }
}
