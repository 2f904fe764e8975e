using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Alignment;

public sealed class SetAlignerTests(ITestOutputHelper output)
{
    private static readonly ImageSize Tile = new(800, 600);

    /// <summary>3 x 3 tiles of a flat sheet, slightly rotated, scaled and tilted; 4-neighbour links.</summary>
    private static SyntheticSet Grid(ulong seed)
    {
        var toWorld = new Transform2D[9];
        for (int r = 0; r < 3; r++)
        {
            for (int c = 0; c < 3; c++)
            {
                int i = r * 3 + c;
                toWorld[i] = SyntheticSet.Place(c * 560 + 7 * r, r * 420 - 5 * c, 1.5 * (i % 3) - 1.5, 1 + 0.01 * (i % 2), 2e-5 * (c - 1), -1.5e-5 * (r - 1));
            }
        }
        var set = new SyntheticSet(Tile, toWorld, seed);
        for (int r = 0; r < 3; r++)
        {
            for (int c = 0; c < 3; c++)
            {
                int i = r * 3 + c;
                if (c < 2)
                {
                    set.AddLink(i, i + 1);
                }
                if (r < 2)
                {
                    set.AddLink(i, i + 3);
                }
            }
        }
        return set;
    }

    /// <summary>12 images on a closed loop over a flat scene, each turned along the loop; links to the next two, wrapping round.</summary>
    private static SyntheticSet Loop(ulong seed)
    {
        const int n = 12;
        var toWorld = new Transform2D[n];
        for (int i = 0; i < n; i++)
        {
            double angle = 360.0 * i / n;
            double rad = angle * Math.PI / 180;
            // Place the image centre on the circle, rotated by the angle.
            var rot = SyntheticSet.Place(0, 0, angle, 1, 1e-5 * Math.Cos(rad), 1e-5 * Math.Sin(rad));
            var (cx, cy) = rot.Apply((Tile.Width - 1) / 2.0, (Tile.Height - 1) / 2.0);
            toWorld[i] = Transform2D.Translation(520 * Math.Cos(rad) - cx, 520 * Math.Sin(rad) - cy) * rot;
        }
        var set = new SyntheticSet(Tile, toWorld, seed);
        for (int i = 0; i < n; i++)
        {
            set.AddLink(i, (i + 1) % n);
            set.AddLink(i, (i + 2) % n);
        }
        return set;
    }

    private (double TreeMean, double TreeMax, double JointMean, double JointMax) Compare(SyntheticSet set, string name)
    {
        var tree = SetAligner.Align(set.Sizes, set.Links, MotionModel.Homography, new AlignmentOptions { JointRefinement = false });
        var joint = SetAligner.Align(set.Sizes, set.Links, MotionModel.Homography);
        Assert.Equal(tree.Reference, joint.Reference);
        var (tm, tx) = set.CornerError(tree, i => tree.Images[i].ToReference);
        var (jm, jx) = set.CornerError(joint, i => joint.Images[i].ToReference);
        var res = joint.Components[0].Residuals;
        output.WriteLine($"{name}: corner error vs truth, spanning tree mean {tm:0.000} px max {tx:0.000} px; joint mean {jm:0.000} px max {jx:0.000} px");
        output.WriteLine($"{name}: tie residuals tree RMS {res.TreeRmsPx:0.000} px, joint RMS {res.JointRmsPx:0.000} px (median {res.JointMedianPx:0.000}, max {res.JointMaxPx:0.000}), {res.Iterations} iterations, {res.TiePoints} tie points");
        foreach (var d in joint.Demoted)
        {
            output.WriteLine($"{name}: demoted {d.ImageA}-{d.ImageB} at {d.Stage}: {d.Reason}");
        }
        return (tm, tx, jm, jx);
    }

    [Fact]
    public void Align_GridWithFalseLink_DemotesItAndBeatsTheTree()
    {
        var set = Grid(11);
        // A repeated-pattern style false match between diagonal neighbours: off by 150 px, 4 degrees.
        var wrong = Transform2D.Translation(150, -40) * SyntheticSet.Place(0, 0, 4) * set.Truth(0, 4);
        set.AddFalseLink(0, 4, wrong, weight: 1000);
        var (tm, _, jm, jx) = Compare(set, "grid 3x3");
        var result = SetAligner.Align(set.Sizes, set.Links, MotionModel.Homography);
        var demoted = Assert.Single(result.Demoted);
        Assert.Equal((0, 4), (demoted.ImageA, demoted.ImageB));
        Assert.Equal(9, result.PlacedCount);
        Assert.Equal(4, result.Reference);
        // Stated bound: with 0.3 px tie noise the joint corner error stays under 1 px mean and 4 px at the
        // worst corner (corners lie outside every overlap, so they carry the extrapolation error).
        Assert.True(jm < 1.0, $"joint mean {jm}");
        Assert.True(jx < 4, $"joint max {jx}");
        Assert.True(jm < tm, $"joint {jm} not better than tree {tm}");
    }

    [Fact]
    public void Align_ClosedLoopWithFalseLink_DemotesItAndClosesTheLoop()
    {
        var set = Loop(23);
        var wrong = Transform2D.Translation(-90, 60) * set.Truth(0, 2);
        set.AddFalseLink(0, 6, wrong, weight: 1000);
        var (tm, _, jm, jx) = Compare(set, "closed loop of 12");
        var result = SetAligner.Align(set.Sizes, set.Links, MotionModel.Homography);
        var demoted = Assert.Single(result.Demoted);
        Assert.Equal((0, 6), (demoted.ImageA, demoted.ImageB));
        Assert.Equal(12, result.PlacedCount);
        Assert.True(jm < 1.0, $"joint mean {jm}");
        Assert.True(jx < 4, $"joint max {jx}");
        Assert.True(jm < tm, $"joint {jm} not better than tree {tm}");
    }

    [Fact]
    public void Align_OneUnrelatedImage_ReportsItUnplacedAndAlignsTheRest()
    {
        var set = Grid(5);
        var extra = new Transform2D[10];
        Array.Copy(set.ToWorld, extra, 9);
        extra[9] = SyntheticSet.Place(5000, 5000, 0);
        var withExtra = new SyntheticSet(Tile, extra, 5);
        withExtra.Links.AddRange(set.Links);
        // The unrelated image only has rejected and weak links (weak links are off by default).
        withExtra.AddFalseLink(9, 0, Transform2D.Translation(30, 20), 12, PairStatus.Rejected);
        withExtra.AddFalseLink(9, 5, Transform2D.Translation(-30, 10), 20, PairStatus.Weak);
        var result = SetAligner.Align(withExtra.Sizes, withExtra.Links, MotionModel.Homography);
        Assert.Equal(9, result.PlacedCount);
        var unplaced = result.Images[9];
        Assert.Null(unplaced.ToReference);
        Assert.Contains("no accepted link", unplaced.Reason, StringComparison.Ordinal);
        Assert.Single(result.Components);
        Assert.False(result.NotPlanar);
        var (mean, _) = withExtra.CornerError(result, i => result.Images[i].ToReference);
        Assert.True(mean < 1.0, $"mean {mean}");
        output.WriteLine($"unplaced image reason: {unplaced.Reason}; rest mean corner error {mean:0.000} px");
    }

    [Fact]
    public void Align_TwoSeparateGroups_AlignsEachOnItsOwn()
    {
        var set = Grid(9);
        // Drop the links between the top row and the rest: the top row becomes its own component.
        var kept = set.Links.Where(l => !(l.ImageA < 3 && l.ImageB >= 3)).ToList();
        var result = SetAligner.Align(set.Sizes, kept, MotionModel.Homography);
        Assert.True(result.IsSplit);
        Assert.Equal(2, result.Components.Length);
        Assert.Equal([3, 4, 5, 6, 7, 8], result.Components[0].Images);
        Assert.Equal([0, 1, 2], result.Components[1].Images);
        Assert.Equal(1, result.Images[0].Component);
        Assert.Equal(1, result.Images[0].Reference);
        Assert.All(result.Images, p => Assert.True(p.IsPlaced));
    }

    [Fact]
    public void Align_AllRoundRotatingCamera_ReportsNotPlanarAndKeepsLinks()
    {
        // A camera turning about its centre through 350 degrees (focal 700 px): no single plane holds it.
        const int n = 15;
        const double focal = 700;
        var k = new Transform2D(focal, 0, 399.5, 0, focal, 299.5, 0, 0, 1);
        var toWorld = new Transform2D[n];
        for (int i = 0; i < n; i++)
        {
            double yaw = 25.0 * i * Math.PI / 180;
            // Rays of image i in world coordinates, written as a 3x3 map (image -> world rays).
            var rotation = new Transform2D(Math.Cos(yaw), 0, Math.Sin(yaw), 0, 1, 0, -Math.Sin(yaw), 0, Math.Cos(yaw));
            toWorld[i] = rotation * k.Inverse();
        }
        var set = new SyntheticSet(Tile, toWorld, 3);
        for (int i = 0; i + 1 < n; i++)
        {
            set.AddLink(i, i + 1);
            if (i + 2 < n)
            {
                set.AddLink(i, i + 2, maxTies: 40);
            }
        }
        var result = SetAligner.Align(set.Sizes, set.Links, MotionModel.Homography);
        foreach (var r in result.NonPlanarReasons)
        {
            output.WriteLine("not planar: " + r);
        }
        foreach (var p in result.Images.Where(p => !p.IsPlaced))
        {
            output.WriteLine($"image {p.Index} unplaced: {p.Reason}");
        }
        Assert.True(result.NotPlanar);
        Assert.NotEmpty(result.NonPlanarReasons);
        Assert.DoesNotContain(result.Demoted, d => d.Stage == "cycle check");
        Assert.Contains(result.Images, p => !p.IsPlaced && p.Reason!.Contains("reference plane", StringComparison.Ordinal));
        Assert.True(result.Images[result.Reference!.Value].IsPlaced);
    }

    [Fact]
    public void Align_TranslationModel_RecoversShiftsExactly()
    {
        var toWorld = Enumerable.Range(0, 6).Select(i => Transform2D.Translation(500 * (i % 3) + 3 * i, 380 * (i / 3) - 2 * i)).ToArray();
        var set = new SyntheticSet(Tile, toWorld, 17);
        foreach (var (a, b) in new[] { (0, 1), (1, 2), (3, 4), (4, 5), (0, 3), (1, 4), (2, 5) })
        {
            var ties = set.Truth(a, b);
            set.Links.Add(new AlignmentLink(a, b, ties, [], PairStatus.Accepted, 10));
        }
        var result = SetAligner.Align(set.Sizes, set.Links, MotionModel.Translation);
        var (mean, max) = set.CornerError(result, i => result.Images[i].ToReference);
        Assert.True(max < 1e-6, $"max {max}");
        Assert.True(mean < 1e-6);
        Assert.All(result.Images, p => Assert.Equal(0, p.ToReference!.Value.M12));
    }

    [Fact]
    public void Align_SameInputTwice_BitIdentical()
    {
        var set = Grid(31);
        var a = SetAligner.Align(set.Sizes, set.Links, MotionModel.Homography);
        var b = SetAligner.Align(set.Sizes, set.Links, MotionModel.Homography);
        Assert.Equal(a.Images.Select(p => p.ToReference), b.Images.Select(p => p.ToReference));
    }

    private static SyntheticSet LargeGrid(double perspective)
    {
        const int side = 6;
        var toWorld = new Transform2D[side * side];
        for (int r = 0; r < side; r++)
        {
            for (int c = 0; c < side; c++)
            {
                toWorld[r * side + c] = SyntheticSet.Place(c * 580 + 3 * r, r * 430 - 4 * c, 0.7 * ((r + c) % 3) - 0.7, 1, perspective * (c - 2.5), perspective * (r - 2.5));
            }
        }
        var set = new SyntheticSet(Tile, toWorld, 77);
        for (int r = 0; r < side; r++)
        {
            for (int c = 0; c < side; c++)
            {
                int i = r * side + c;
                if (c + 1 < side)
                {
                    set.AddLink(i, i + 1, maxTies: 40);
                }
                if (r + 1 < side)
                {
                    set.AddLink(i, i + side, maxTies: 40);
                }
            }
        }
        return set;
    }

    [Fact]
    public void Align_SixBySixGridOfHomographies_JointWithinStatedErrorOfTruth()
    {
        // 36 tiles, 60 links, a central reference. A homography's perspective terms are weakly
        // observed through narrow overlaps, so noise (0.3 px) grows with distance from the reference:
        // stated bound mean < 2.5 px, worst corner < 12 px (3 x 3: < 1 px mean).
        var (tm, tx, jm, jx) = Compare(LargeGrid(1e-5), "grid 6x6 homography");
        Assert.True(jm < 2.5, $"joint mean {jm}");
        Assert.True(jx < 12, $"joint max {jx}");
        Assert.True(jm < tm && jx < tx);
    }

    [Fact]
    public void Align_SixBySixGridAffine_JointWithinOnePixelOfTruth()
    {
        var set = LargeGrid(0);
        var tree = SetAligner.Align(set.Sizes, set.Links, MotionModel.Affine, new AlignmentOptions { JointRefinement = false });
        var joint = SetAligner.Align(set.Sizes, set.Links, MotionModel.Affine);
        var (tm, tx) = set.CornerError(tree, i => tree.Images[i].ToReference);
        var (jm, jx) = set.CornerError(joint, i => joint.Images[i].ToReference);
        output.WriteLine($"grid 6x6 affine: corner error vs truth, spanning tree mean {tm:0.000} px max {tx:0.000} px; joint mean {jm:0.000} px max {jx:0.000} px");
        Assert.True(jm < 1.0, $"joint mean {jm}");
        Assert.True(jx < 3, $"joint max {jx}");
    }
}
