using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Tests.Planning;

public class PairPlannerTests
{
    private static List<PlanImage> Images(params string[] keys) => keys.Select(k => new PlanImage(k, null, [1f])).ToList();

    private static HashSet<string> Names(PairPlan plan, IReadOnlyList<PlanImage> images) =>
        plan.Pairs.Select(p => string.Join("|", new[] { images[p.A].Key, images[p.B].Key }.Order(StringComparer.Ordinal))).ToHashSet();

    [Fact]
    public void Plan_SequenceSpanTwo_PairsNeighboursAndNextButOne()
    {
        var imgs = Images("a10.png", "a2.png", "a1.png", "a3.png");
        var plan = PairPlanner.Plan(new PairingSettings { Mode = PairingMode.Sequence, NeighbourSpan = 2 }, imgs);
        // natural order a1, a2, a3, a10
        Assert.Equal(new HashSet<string> { "a1.png|a2.png", "a1.png|a3.png", "a2.png|a3.png", "a10.png|a2.png", "a10.png|a3.png" }, Names(plan, imgs));
        // The next-but-one pairs are conditional: estimated only where the neighbours' alignment allows an overlap.
        Assert.Equal(new HashSet<string> { "a1.png|a3.png", "a10.png|a2.png" },
            plan.Conditional.Select(k => string.Join("|", new[] { imgs[plan.Pairs[k].A].Key, imgs[plan.Pairs[k].B].Key }.Order(StringComparer.Ordinal))).ToHashSet());
    }

    [Fact]
    public void Plan_SequenceWithWrap_ClosesTheLoop()
    {
        var imgs = Images("1.jpg", "2.jpg", "3.jpg", "4.jpg", "5.jpg");
        var plan = PairPlanner.Plan(new PairingSettings { Mode = PairingMode.Sequence, NeighbourSpan = 2, Wrap = true }, imgs);
        var names = Names(plan, imgs);
        Assert.Contains("1.jpg|5.jpg", names);
        Assert.Contains("1.jpg|4.jpg", names);
        Assert.Contains("2.jpg|5.jpg", names);
        Assert.Equal(10, plan.Pairs.Count); // 5 images, span 2, closed: every image has 4 partners -> 5 * 4 / 2
    }

    [Fact]
    public void Plan_SequenceByCaptureTime_OrdersByTimeNotName()
    {
        var t0 = new DateTimeOffset(2026, 1, 1, 0, 0, 0, TimeSpan.Zero);
        var imgs = new List<PlanImage> { new("c.jpg", t0, [1f]), new("a.jpg", t0.AddSeconds(2), [1f]), new("b.jpg", t0.AddSeconds(1), [1f]) };
        var plan = PairPlanner.Plan(new PairingSettings { Mode = PairingMode.Sequence, Order = SequenceOrder.CaptureTime, NeighbourSpan = 2 }, imgs);
        Assert.Equal("c.jpg", imgs[plan.Pairs[0].A].Key); // c is first in time
        Assert.Equal("b.jpg", imgs[plan.Pairs[0].B].Key);
    }

    [Fact]
    public void Plan_Grid_PairsFourNeighboursAndSkipsUnmatchedNames()
    {
        var imgs = Images("r1c1.tif", "r1c2.tif", "r2c1.tif", "r2c2.tif", "notes.tif");
        var plan = PairPlanner.Plan(new PairingSettings { Mode = PairingMode.Grid }, imgs);
        Assert.Equal(new HashSet<string> { "r1c1.tif|r1c2.tif", "r1c1.tif|r2c1.tif", "r1c2.tif|r2c2.tif", "r2c1.tif|r2c2.tif" }, Names(plan, imgs));
        Assert.Single(plan.Skipped);
        Assert.Equal("notes.tif", plan.Skipped[0].Key);
    }

    [Fact]
    public void Plan_GridWithDiagonals_AddsBothDiagonals()
    {
        var imgs = Images("r1c1.tif", "r1c2.tif", "r2c1.tif", "r2c2.tif");
        var plan = PairPlanner.Plan(new PairingSettings { Mode = PairingMode.Grid, GridDiagonals = true }, imgs);
        Assert.Equal(6, plan.Pairs.Count);
        // The two diagonals are conditional, the four sides are not.
        Assert.Equal(new HashSet<string> { "r1c1.tif|r2c2.tif", "r1c2.tif|r2c1.tif" },
            plan.Conditional.Select(k => string.Join("|", new[] { imgs[plan.Pairs[k].A].Key, imgs[plan.Pairs[k].B].Key }.Order(StringComparer.Ordinal))).ToHashSet());
    }

    [Fact]
    public void Plan_All_KeepsOnlyBestPartnersAboveTheFloor()
    {
        // Two groups of similar signatures: the pre-filter must not pair across them.
        var imgs = new List<PlanImage>
        {
            new("a1", null, [1f, 0f]), new("a2", null, [0.99f, 0.1f]), new("a3", null, [0.98f, 0.15f]),
            new("b1", null, [0f, 1f]), new("b2", null, [0.1f, 0.99f]),
        };
        var plan = PairPlanner.Plan(new PairingSettings { Mode = PairingMode.All, AllMaxPartners = 4, AllMinSimilarity = 0.5 }, imgs);
        Assert.Equal(new HashSet<string> { "a1|a2", "a1|a3", "a2|a3", "b1|b2" }, Names(plan, imgs));
    }

    [Fact]
    public void Plan_AllWithManyImages_CostGrowsLinearly()
    {
        var imgs = Enumerable.Range(0, 60).Select(i => new PlanImage("i" + i, null, [MathF.Cos(i * 0.05f), MathF.Sin(i * 0.05f)])).ToList();
        var plan = PairPlanner.Plan(new PairingSettings { Mode = PairingMode.All, AllMaxPartners = 3, AllMinSimilarity = 0 }, imgs);
        Assert.True(plan.Pairs.Count <= 60 * 3, $"{plan.Pairs.Count} pairs for 60 images with 3 partners each");
        Assert.True(plan.Pairs.Count >= 60 * 3 / 2);
    }

    [Fact]
    public void Plan_Frames_PairsEveryCamera()
    {
        var imgs = Images("cam1/0001.jpg", "cam2/0001.jpg", "cam3/0001.jpg");
        var plan = PairPlanner.Plan(new PairingSettings { Mode = PairingMode.Frames }, imgs);
        Assert.Equal(3, plan.Pairs.Count);
    }
}
