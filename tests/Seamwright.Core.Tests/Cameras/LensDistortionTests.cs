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

    [Theory]
    [InlineData(-0.1, 0)]
    [InlineData(-0.3, 0.01)]
    [InlineData(-0.05, -0.02)]
    public void MonotoneRadius_IsWhereTheSeenRadiusStopsGrowing(double k1, double k2)
    {
        // The seen radius r (1 + k1 r^2 + k2 r^4) grows up to the fold and shrinks just past it.
        var lens = new LensDistortion(k1, k2);
        double s = lens.MonotoneRadiusSquared;
        Assert.True(double.IsFinite(s) && s > 0, $"fold at r^2 = {s}");
        double Seen(double r) => r * lens.Factor(r * r);
        double rf = Math.Sqrt(s);
        Assert.True(Seen(rf * 0.99) < Seen(rf), "below the fold the radius still grows");
        Assert.True(Seen(rf * 1.01) < Seen(rf), "past the fold the radius shrinks");
    }

    [Theory]
    [InlineData(0, 0)]
    [InlineData(0.05, 0)]
    [InlineData(0.05, 0.01)]
    [InlineData(-0.2, 0.03)]
    public void MonotoneRadius_WhereTheSeenRadiusAlwaysGrows_IsInfinite(double k1, double k2) =>
        Assert.True(double.IsPositiveInfinity(new LensDistortion(k1, k2).MonotoneRadiusSquared));
}
