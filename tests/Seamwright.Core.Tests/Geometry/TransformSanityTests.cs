using Seamwright.Core.Geometry;

namespace Seamwright.Core.Tests.Geometry;

public class TransformSanityTests
{
    private static readonly ImageSize Size = new(1000, 800);
    private static readonly SanityLimits Limits = new();

    [Fact]
    public void FindProblem_ModestHomography_None() =>
        Assert.Null(TransformSanity.FindProblem(new Transform2D(0.95, 0.08, -240, -0.05, 1.04, 60, 2e-5, -3e-5, 1), Size, Limits));

    [Fact]
    public void FindProblem_Mirror_ReportsOrientation() =>
        Assert.Contains("mirror", TransformSanity.FindProblem(new Transform2D(-1, 0, 999, 0, 1, 0, 0, 0, 1), Size, Limits));

    [Fact]
    public void FindProblem_CornerBehindViewer_ReportsIt() =>
        Assert.Contains("behind", TransformSanity.FindProblem(new Transform2D(1, 0, 0, 0, 1, 0, -0.002, 0, 1), Size, Limits));

    [Fact]
    public void FindProblem_HugeZoom_ReportsScale() =>
        Assert.Contains("scale", TransformSanity.FindProblem(Transform2D.Scaling(50, 50), Size, Limits));

    [Fact]
    public void FindProblem_StrongPerspective_ReportsIt() =>
        Assert.Contains("perspective", TransformSanity.FindProblem(new Transform2D(1, 0, 0, 0, 1, 0, 0.0005, 0, 0.01), Size, Limits with { MaxScale = 1e9 }));

    [Fact]
    public void FindProblem_NotFinite_ReportsIt() =>
        Assert.Contains("non-finite", TransformSanity.FindProblem(new Transform2D(double.NaN, 0, 0, 0, 1, 0, 0, 0, 1), Size, Limits));
}
