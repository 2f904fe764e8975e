using Seamwright.Core.Cameras;
using Seamwright.Core.Alignment;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Cameras;

/// <summary>
/// The camera-rotation set model against rigs with known truth (issue 10 targets: every frame
/// placed, median relative rotation error at most 0.02 degrees, worst at most 0.1, focal within
/// 0.3 %, k1 within 0.01). Tie points carry 0.3 px of noise per coordinate.
/// </summary>
public class RotationSetSolverTests(ITestOutputHelper output)
{
    private RotationSetSolution SolveAndReport(RotationRig rig, RotationSetOptions options, string name)
    {
        var links = rig.Links(0.3, 7);
        var solution = RotationSetSolver.Solve(rig.Sizes, rig.OneCamera, links, options);
        var errors = rig.RelativeErrorsDeg(solution);
        output.WriteLine($"{name}: {links.Count} links, placed {solution.PlacedCount}/{rig.Count}, median {Median(errors):0.0000} deg, worst {errors.DefaultIfEmpty(double.NaN).Max():0.0000} deg, " +
            $"focal {solution.Poses.First(p => p is not null)!.FocalPx:0.000} (truth {rig.Focal:0.000}), k1 {solution.Poses.First(p => p is not null)!.Distortion.K1:0.0000}, " +
            $"rms {solution.Residuals.RmsPx:0.000} px from {solution.Residuals.InitialRmsPx:0.000}, {solution.Residuals.Iterations} iterations, levelling {solution.LevellingDeg:0.00} deg");
        return solution;
    }

    private static double Median(double[] v)
    {
        var s = v.Order().ToArray();
        return s.Length == 0 ? double.NaN : s.Length % 2 == 1 ? s[s.Length / 2] : 0.5 * (s[s.Length / 2 - 1] + s[s.Length / 2]);
    }

    private static void AssertTargets(RotationRig rig, RotationSetSolution solution, double focalTolerance = 0.003)
    {
        Assert.Equal(rig.Count, solution.PlacedCount);
        var errors = rig.RelativeErrorsDeg(solution);
        Assert.True(Median(errors) <= 0.02, $"median relative rotation error {Median(errors)} deg");
        Assert.True(errors.Max() <= 0.1, $"worst relative rotation error {errors.Max()} deg");
        foreach (var pose in solution.Poses)
        {
            Assert.True(Math.Abs(pose!.FocalPx / rig.Focal - 1) <= focalTolerance, $"focal {pose.FocalPx} vs {rig.Focal}");
        }
    }

    [Fact]
    public void Solve_FullTurnOneRow_MeetsTargetsAndClosesTheLoop()
    {
        var rig = RotationRig.FullTurn();
        var solution = SolveAndReport(rig, new RotationSetOptions(), "full turn");
        AssertTargets(rig, solution);
        // Levelled: every camera's x axis horizontal (the world's y component near zero).
        Assert.All(solution.Poses, p => Assert.True(Math.Abs(p!.Rotation.M21) < 1e-3, $"x axis tilt {p.Rotation.M21}"));
    }

    [Fact]
    public void Solve_TwoRows_MeetsTargets()
    {
        var rig = RotationRig.TwoRows();
        AssertTargets(rig, SolveAndReport(rig, new RotationSetOptions(), "two rows"));
    }

    [Fact]
    public void Solve_BarrelPan_RecoversK1()
    {
        var rig = RotationRig.BarrelPan();
        var solution = SolveAndReport(rig, new RotationSetOptions { Distortion = DistortionTerms.K1 }, "150 degree pan, k1 -0.1");
        AssertTargets(rig, solution);
        Assert.All(solution.Poses, p => Assert.True(Math.Abs(p!.Distortion.K1 - rig.Lens.K1) <= 0.01, $"k1 {p.Distortion.K1}"));
    }

    [Fact]
    public void Solve_BarrelPanDefaultOptions_AutomaticDistortionKeepsK1()
    {
        var rig = RotationRig.BarrelPan();
        var solution = SolveAndReport(rig, new RotationSetOptions(), "150 degree pan, k1 -0.1, automatic distortion");
        AssertTargets(rig, solution);
        Assert.All(solution.Poses, p => Assert.True(Math.Abs(p!.Distortion.K1 - rig.Lens.K1) <= 0.01, $"k1 {p.Distortion.K1}"));
        Assert.StartsWith("radial distortion k1 estimated", solution.DistortionReason, StringComparison.Ordinal);
    }

    [Fact]
    public void Solve_FullTurnDefaultOptions_AutomaticDistortionKeepsThePlainSolution()
    {
        var rig = RotationRig.FullTurn();
        var links = rig.Links(0.3, 7);
        var auto = RotationSetSolver.Solve(rig.Sizes, rig.OneCamera, links, new RotationSetOptions());
        var plain = RotationSetSolver.Solve(rig.Sizes, rig.OneCamera, links, new RotationSetOptions { Distortion = DistortionTerms.None });
        output.WriteLine(auto.DistortionReason);
        Assert.StartsWith("no lens distortion", auto.DistortionReason, StringComparison.Ordinal);
        Assert.Equal(plain.Poses, auto.Poses);
    }

    [Fact]
    public void Solve_ZenithFrame_Placed()
    {
        var rig = RotationRig.WithZenith();
        AssertTargets(rig, SolveAndReport(rig, new RotationSetOptions(), "rows with a zenith frame"));
    }

    [Fact]
    public void Solve_FocalPerImage_StillRecoversFocal()
    {
        var rig = RotationRig.FullTurn();
        AssertTargets(rig, SolveAndReport(rig, new RotationSetOptions { FocalPerImage = true }, "full turn, focal per image"), 0.01);
    }

    [Fact]
    public void Solve_SameInputsTwice_BitIdentical()
    {
        var rig = RotationRig.TwoRows();
        var links = rig.Links(0.3, 9);
        var a = RotationSetSolver.Solve(rig.Sizes, rig.OneCamera, links);
        var b = RotationSetSolver.Solve(rig.Sizes, rig.OneCamera, links);
        for (int i = 0; i < rig.Count; i++)
        {
            Assert.Equal(a.Poses[i]!.Rotation.ToRowMajor(), b.Poses[i]!.Rotation.ToRowMajor());
            Assert.Equal(a.Poses[i]!.FocalPx, b.Poses[i]!.FocalPx);
        }
    }

    [Fact]
    public void Solve_FalseLink_LeftOut()
    {
        var rig = RotationRig.FullTurn();
        var links = rig.Links(0.3, 11);
        // A wrong link: frames 3 and 9 (144 degrees apart) tied by the tie points of frames 3 and 4.
        var donor = links.First(l => l.ImageA == 3 && l.ImageB == 4);
        links.Add(donor with { ImageB = 9 });
        var solution = RotationSetSolver.Solve(rig.Sizes, rig.OneCamera, rig.Links(0.3, 11));
        var withFalse = RotationSetSolver.Solve(rig.Sizes, rig.OneCamera, links);
        output.WriteLine(string.Join("\n", withFalse.LeftOut.Select(l => $"{l.ImageA}-{l.ImageB}: {l.Reason}")));
        Assert.Contains(withFalse.LeftOut, l => l.ImageA == 3 && l.ImageB == 9);
        AssertTargets(rig, withFalse);
        Assert.Equal(rig.Count, solution.PlacedCount);
    }

    [Fact]
    public void Solve_Disconnected_UnplacedWithReason()
    {
        var rig = RotationRig.FullTurn();
        var links = rig.Links(0.3, 5).Where(l => l.ImageA != 7 && l.ImageB != 7).ToList();
        var solution = RotationSetSolver.Solve(rig.Sizes, rig.OneCamera, links);
        Assert.Null(solution.Poses[7]);
        Assert.Contains("no usable link", solution.Reasons[7]);
        Assert.Equal(rig.Count - 1, solution.PlacedCount);
    }
}
