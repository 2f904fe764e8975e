using Seamwright.Core.Geometry;
using Seamwright.Host.Operations;

namespace Seamwright.Host.Tests.Operations;

public class SmallPartsTests
{
    [Fact]
    public void Percentile_OneToTen_MatchesDefinitionSeven()
    {
        // Hyndman and Fan (1996) definition 7: h = (n - 1) p, interpolate between order statistics.
        double[] v = [10, 1, 9, 2, 8, 3, 7, 4, 6, 5];
        Assert.Equal(5.5, Percentile.Of(v, 0.5));
        Assert.Equal(9.55, Percentile.Of(v, 0.95)!.Value, 12);
        Assert.Equal(1, Percentile.Of(v, 0));
        Assert.Null(Percentile.Of([], 0.5));
    }

    [Fact]
    public void RejectionDrift_SteadyRate_NoWarning()
    {
        var drift = new RejectionDrift(recentWindow: 100, historyWindow: 400);
        for (int i = 0; i < 1000; i++)
        {
            drift.Add(i % 10 == 0); // 10 % rejected throughout
        }
        Assert.Null(drift.Check());
    }

    [Fact]
    public void RejectionDrift_RateJumps_WarnsWithBothRates()
    {
        var drift = new RejectionDrift(recentWindow: 100, historyWindow: 400);
        for (int i = 0; i < 500; i++)
        {
            drift.Add(i % 10 == 0);
        }
        for (int i = 0; i < 100; i++)
        {
            drift.Add(i % 2 == 0); // 50 % rejected in the recent window
        }
        string? warning = drift.Check();
        Assert.NotNull(warning);
        Assert.Contains("50%", warning, StringComparison.Ordinal);
        Assert.Contains("10%", warning, StringComparison.Ordinal);
    }

    [Fact]
    public void RejectionDrift_TooFewPairs_NoWarning()
    {
        var drift = new RejectionDrift(recentWindow: 100, historyWindow: 400);
        for (int i = 0; i < 150; i++)
        {
            drift.Add(true);
        }
        Assert.Null(drift.Check());
    }

    [Fact]
    public void RigBaseline_LearnedFromFirstResults_FlagsMovedCameraOnly()
    {
        var rig = new RigBaseline(learnFromFirst: 3, tolerancePixels: 5);
        var size = new ImageSize(1000, 800);
        // Learning: two near the true offset and one outlier; the medoid must be a near one.
        Assert.Null(rig.Check("cam1", "cam2", Transform2D.Translation(-600, 2), size));
        Assert.Null(rig.Check("cam1", "cam2", Transform2D.Translation(-450, 40), size));
        Assert.Null(rig.Check("cam1", "cam2", Transform2D.Translation(-601, 1), size));
        var baseline = rig.BaselineOf("cam1", "cam2")!.Value;
        Assert.True(Math.Abs(baseline.M13 + 600.5) <= 0.5, "medoid is one of the two agreeing results");

        Assert.Null(rig.Check("cam1", "cam2", Transform2D.Translation(-602, 3), size));
        string? moved = rig.Check("cam1", "cam2", Transform2D.Translation(-620, 2), size);
        Assert.NotNull(moved);
        Assert.Contains("cam1->cam2", moved, StringComparison.Ordinal);
        Assert.Null(rig.Check("cam2", "cam3", Transform2D.Translation(-620, 2), size)); // another pair is still learning
    }

    [Fact]
    public void RigBaseline_Configured_UsedAtOnce()
    {
        var rig = new RigBaseline(learnFromFirst: 5, tolerancePixels: 5);
        rig.Configure("a", "b", Transform2D.Translation(100, 0));
        Assert.NotNull(rig.Check("a", "b", Transform2D.Identity, new ImageSize(640, 480)));
        Assert.Null(rig.Check("a", "b", Transform2D.Translation(101, 1), new ImageSize(640, 480)));
    }

    [Fact]
    public void Validate_DefaultOptions_NoProblems()
    {
        Assert.Empty(new OperationsOptions().Validate());
        Assert.Empty(new Seamwright.Host.Supervision.SupervisionOptions().Validate());
        Assert.Contains("Operations:HeartbeatSeconds must be 1..300", new OperationsOptions { HeartbeatSeconds = 0.5 }.Validate());
        Assert.Contains("Supervision:Workers must be 1..32", new Seamwright.Host.Supervision.SupervisionOptions { Workers = 0 }.Validate());
    }
}
