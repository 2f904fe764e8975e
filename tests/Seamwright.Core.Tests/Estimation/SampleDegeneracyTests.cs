using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Tests.Estimation;

public class SampleDegeneracyTests
{
    private static Correspondence Same(double x, double y) => new(x, y, x + 10, y + 5);

    [Fact]
    public void HasCollinearTriple_ThreePointsOnALine_True()
    {
        Correspondence[] s = [Same(0, 0), Same(50, 50), Same(100, 100.01), Same(0, 100)];
        Assert.True(SampleDegeneracy.HasCollinearTriple(s));
    }

    [Fact]
    public void HasCollinearTriple_GeneralPosition_False()
    {
        Correspondence[] s = [Same(0, 0), Same(100, 0), Same(100, 100), Same(0, 100)];
        Assert.False(SampleDegeneracy.HasCollinearTriple(s));
        Assert.False(SampleDegeneracy.HasOrientationFlip(s));
    }

    [Fact]
    public void HasOrientationFlip_MirroredSecondImage_True()
    {
        Correspondence[] s = [new(0, 0, 0, 0), new(100, 0, -100, 0), new(100, 100, -100, 100), new(0, 100, 0, 100)];
        Assert.True(SampleDegeneracy.HasOrientationFlip(s));
    }

    [Fact]
    public void HasRepeatedPoint_SamePointTwice_True()
    {
        Correspondence[] s = [Same(3, 4), Same(3, 4)];
        Assert.True(SampleDegeneracy.HasRepeatedPoint(s));
    }

    [Fact]
    public void HomographyEstimator_CollinearSample_IsDegenerate()
    {
        Correspondence[] s = [Same(0, 0), Same(1, 1), Same(2, 2), Same(5, 0)];
        Assert.True(new HomographyEstimator().IsDegenerate(s));
    }
}
