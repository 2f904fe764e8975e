using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Synthetic;

public class LatticeNoiseTests
{
    [Theory]
    [InlineData(12.3, -45.6, 10.0)]
    [InlineData(-1000.7, 333.1, 37.5)]
    public void FractalWithGradient_AnyPoint_GradientMatchesFiniteDifferences(double x, double y, double spacing)
    {
        double v = LatticeNoise.FractalWithGradient(3, 1, x, y, spacing, 3, out double gx, out double gy);
        double e = 1e-5;
        double nx = (LatticeNoise.Fractal(3, 1, x + e, y, spacing, 3) - LatticeNoise.Fractal(3, 1, x - e, y, spacing, 3)) / (2 * e);
        double ny = (LatticeNoise.Fractal(3, 1, x, y + e, spacing, 3) - LatticeNoise.Fractal(3, 1, x, y - e, spacing, 3)) / (2 * e);
        Assert.InRange(v, 0, 1);
        Assert.Equal(nx, gx, 6);
        Assert.Equal(ny, gy, 6);
    }

    [Fact]
    public void Value_LatticePoints_AreUncorrelatedAndCoverUnitRange()
    {
        var values = new List<double>();
        for (int i = 0; i < 2000; i++)
        {
            values.Add(LatticeNoise.Value(9, 2, i * 4.0, 7 * 4.0, 4.0));
        }
        double mean = values.Average();
        Assert.InRange(mean, 0.47, 0.53);
        Assert.InRange(values.Min(), 0, 0.01);
        Assert.InRange(values.Max(), 0.99, 1);
        double lag = 0;
        for (int i = 1; i < values.Count; i++)
        {
            lag += (values[i] - mean) * (values[i - 1] - mean);
        }
        double variance = values.Sum(v => (v - mean) * (v - mean));
        Assert.InRange(lag / variance, -0.06, 0.06);
    }
}
