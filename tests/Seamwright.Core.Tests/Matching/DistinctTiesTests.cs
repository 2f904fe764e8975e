using Seamwright.Core.Geometry;
using Seamwright.Core.Matching;

namespace Seamwright.Core.Tests.Matching;

public class DistinctTiesTests
{
    [Fact]
    public void Select_RepeatWithinToleranceInBothImages_FirstKept()
    {
        Correspondence[] ties =
        [
            new(414.21330282564384, 88.6302435138544, 289, 76),
            new(10, 10, 20, 20),
            new(414.21330279957976, 88.63024349539376, 289, 76),
            new(414.5, 88.9, 289.4, 75.7),
        ];
        Assert.Equal([0, 1], DistinctTies.Select(ties, 1.0));
    }

    [Fact]
    public void Select_CloseInOneImageOnly_BothKept()
    {
        Correspondence[] ties = [new(100, 100, 50, 50), new(100.2, 100.1, 58, 50), new(140, 100, 50.3, 50.2)];
        Assert.Equal([0, 1, 2], DistinctTies.Select(ties, 1.0));
    }

    [Fact]
    public void Select_NeighbouringCellsAcrossBoundary_RepeatFound()
    {
        // 0.99 and 1.01 fall in different cells of side 1 but are 0.02 apart.
        Correspondence[] ties = [new(0.99, 5.0, 3, 3), new(1.01, 5.0, 3.01, 3)];
        Assert.Equal([0], DistinctTies.Select(ties, 1.0));
    }

    [Fact]
    public void Select_NonPositiveTolerance_Throws() =>
        Assert.Throws<ArgumentOutOfRangeException>(() => DistinctTies.Select([new(0, 0, 0, 0)], 0));
}
