using Seamwright.Core.Alignment;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Cameras;

/// <summary>The reach bound rules out only pairs that share nothing, and rules out most pairs of a large set.</summary>
public class OverlapReachTests
{
    public static TheoryData<string> Rigs => ["full turn", "two rows", "barrel pan", "zenith"];

    [Theory]
    [MemberData(nameof(Rigs))]
    public void RotationSets_EveryPairThatSharesAreaMayMeet(string name)
    {
        var rig = name switch
        {
            "full turn" => RotationRig.FullTurn(),
            "two rows" => RotationRig.TwoRows(),
            "barrel pan" => RotationRig.BarrelPan(),
            _ => RotationRig.WithZenith(),
        };
        var links = rig.Links(0.3, 11);
        var result = SetModelSelector.Align(rig.Sizes, rig.OneCamera, links, MotionModel.Homography, SetModelKind.Rotation);
        Assert.True(result.IsRotation);
        AssertSound(result, rig.Sizes, out int ruledOut);
        // The bound must do something on a full turn: frames half a turn apart cannot meet.
        if (name == "full turn")
        {
            Assert.True(ruledOut > 0, "no pair of the full turn was ruled out");
        }
    }

    [Fact]
    public void PlanarGrid_EveryPairThatSharesAreaMayMeet_AndMostPairsAreRuledOut()
    {
        var (sizes, links) = GridLinks.Make(12, 10, 0.02, 3);
        var result = SetModelSelector.Align(sizes, new int[sizes.Length], links, MotionModel.Homography, SetModelKind.Auto);
        Assert.False(result.IsRotation);
        AssertSound(result, sizes, out int ruledOut);
        int all = sizes.Length * (sizes.Length - 1) / 2;
        // 120 tiles with 8 neighbours at most each: at most 480 pairs of 7140 can meet.
        Assert.True(ruledOut > all - 480 - 1, $"{ruledOut} of {all} ruled out");
    }

    [Fact]
    public void Plan_AddsTheSamePairsAsSamplingEveryPair()
    {
        var (sizes, links) = GridLinks.Make(8, 6, 0.02, 9);
        // Plan the horizontal neighbours and the first column (one connected set): the forecast must add the other vertical ones.
        var planned = links.Where(l => (l.ImageB == l.ImageA + 1 && l.ImageA / 8 == l.ImageB / 8) || (l.ImageA % 8 == 0 && l.ImageB == l.ImageA + 8)).ToList();
        var result = SetModelSelector.Align(sizes, new int[sizes.Length], planned, MotionModel.Homography, SetModelKind.Auto);
        var (_, toAdd) = OverlapPrediction.Plan(result, sizes, [.. planned.Select(l => (l.ImageA, l.ImageB))]);
        var plannedSet = planned.Select(l => (l.ImageA, l.ImageB)).ToHashSet();
        var exhaustive = new List<(int, int)>();
        for (int a = 0; a < sizes.Length; a++)
        {
            for (int b = a + 1; b < sizes.Length; b++)
            {
                if (!plannedSet.Contains((a, b)) && OverlapPrediction.Shared(result, sizes, a, b) is double f && f >= OverlapPrediction.AddAtOrAbove)
                {
                    exhaustive.Add((a, b));
                }
            }
        }
        Assert.NotEmpty(exhaustive);
        Assert.Equal(exhaustive, toAdd.Select(p => (p.A, p.B)).ToList());
    }

    private static void AssertSound(SetModelResult result, ImageSize[] sizes, out int ruledOut)
    {
        var reach = OverlapReach.Of(result, sizes);
        var candidates = reach.Candidates().ToHashSet();
        ruledOut = 0;
        for (int a = 0; a < sizes.Length; a++)
        {
            for (int b = a + 1; b < sizes.Length; b++)
            {
                Assert.Equal(reach.MayMeet(a, b), candidates.Contains((a, b)));
                if (!reach.MayMeet(a, b))
                {
                    ruledOut++;
                    Assert.False(OverlapPrediction.Shared(result, sizes, a, b) is > 0, $"{a}-{b} share area but were ruled out");
                }
            }
        }
    }
}
