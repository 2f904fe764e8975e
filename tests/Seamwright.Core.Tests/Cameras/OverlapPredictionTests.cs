using Seamwright.Core.Alignment;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Cameras;

/// <summary>Overlap-aware planning from the alignment of the first links.</summary>
public class OverlapPredictionTests
{
    [Fact]
    public void Plan_FullTurnWithoutTheWrap_AddsTheClosingPairs()
    {
        // A sequence plan (next two neighbours, no wrap) over the full-turn rig.
        var rig = RotationRig.FullTurn();
        var links = rig.Links(0.3, 7).Where(l => l.ImageB - l.ImageA <= 2).ToList();
        var result = SetModelSelector.Align(rig.Sizes, rig.OneCamera, links, MotionModel.Homography, SetModelKind.Auto);
        Assert.True(result.IsRotation);
        var (notExpected, toAdd) = OverlapPrediction.Plan(result, rig.Sizes, [.. links.Select(l => (l.ImageA, l.ImageB))]);
        Assert.Empty(notExpected);
        // The wrap: 14 with 0 and 1, 13 with 0 (24 and 48 degrees apart across the seam).
        Assert.Contains(toAdd, p => p.A == 0 && p.B == 14);
        Assert.Contains(toAdd, p => p.A == 1 && p.B == 14);
        Assert.Contains(toAdd, p => p.A == 0 && p.B == 13);
        // Nothing three or more steps apart (72 degrees with a 65 degree field of view cannot overlap).
        Assert.All(toAdd, p => Assert.True(Math.Min(p.B - p.A, 15 - (p.B - p.A)) <= 2, $"{p.A}-{p.B}"));
    }

    [Fact]
    public void Plan_SweepWithSecondNeighboursApart_NotExpected()
    {
        // Frames 400 px apart, 640 px wide: second neighbours (800 px apart) cannot overlap.
        var size = new ImageSize(640, 480);
        var rng = new SyntheticRandom(5);
        int n = 12;
        var toScene = Enumerable.Range(0, n).Select(k => Transform2D.Translation(400 * k, 3 * Math.Sin(k))).ToArray();
        var links = new List<AlignmentLink>();
        var planned = new List<(int, int)>();
        for (int a = 0; a < n; a++)
        {
            for (int b = a + 1; b < Math.Min(n, a + 3); b++)
            {
                planned.Add((a, b));
                var aToB = (toScene[b].Inverse() * toScene[a]).Normalized();
                var ties = new List<Correspondence>();
                for (int i = 0; i < 200; i++)
                {
                    double x = 639 * rng.NextDouble(), y = 479 * rng.NextDouble();
                    var (u, v) = aToB.Apply(x, y);
                    if (u >= 0 && u <= 639)
                    {
                        ties.Add(new Correspondence(x, y, u + 0.1 * rng.NextGaussian(), v + 0.1 * rng.NextGaussian()));
                    }
                }
                links.Add(new AlignmentLink(a, b, aToB, [.. ties], ties.Count >= 20 ? PairStatus.Accepted : PairStatus.Rejected, ties.Count));
            }
        }
        var sizes = Enumerable.Repeat(size, n).ToArray();
        var result = SetModelSelector.Align(sizes, new int[n], links, MotionModel.Homography, SetModelKind.Auto);
        Assert.False(result.IsRotation);
        var (notExpected, toAdd) = OverlapPrediction.Plan(result, sizes, planned);
        Assert.Empty(toAdd);
        Assert.Equal(n - 2, notExpected.Count);
        Assert.All(notExpected, p => Assert.Equal(2, p.B - p.A));
    }
}
