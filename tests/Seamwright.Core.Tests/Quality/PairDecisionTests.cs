using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Quality;

namespace Seamwright.Core.Tests.Quality;

public class PairDecisionTests
{
    private static readonly DecisionOptions Options = new();

    private static PairEvidence Evidence(int consensus = 100, int matches = 200, int runnerUp = 0, double sigma = 1, string? sanity = null, bool model = true) =>
        new(MotionModel.Homography, model ? Transform2D.Identity : null, matches, matches, consensus, runnerUp, sigma, 3, sanity);

    [Fact]
    public void Decide_ClearResult_AcceptedWithoutReasons()
    {
        var v = PairDecision.Decide(Evidence(), Options);
        Assert.Equal(PairStatus.Accepted, v.Status);
        Assert.Empty(v.Reasons);
    }

    [Fact]
    public void Decide_NoModel_Rejected() =>
        Assert.Equal(PairStatus.Rejected, PairDecision.Decide(Evidence(consensus: 0, model: false), Options).Status);

    [Fact]
    public void Decide_FewerThanMinimumPlusFour_Rejected()
    {
        var v = PairDecision.Decide(Evidence(consensus: 7, matches: 20), Options);
        Assert.Equal(PairStatus.Rejected, v.Status);
        Assert.Contains(v.Reasons, r => r.Contains("at least 8", StringComparison.Ordinal));
    }

    [Fact]
    public void Decide_FailedSanity_RejectedWithTheProblem()
    {
        var v = PairDecision.Decide(Evidence(sanity: "the transform mirrors the image"), Options);
        Assert.Equal(PairStatus.Rejected, v.Status);
        Assert.Contains(v.Reasons, r => r.Contains("mirrors", StringComparison.Ordinal));
    }

    [Fact]
    public void Decide_CloseRunnerUp_Weak()
    {
        var v = PairDecision.Decide(Evidence(consensus: 100, runnerUp: 80), Options);
        Assert.Equal(PairStatus.Weak, v.Status);
        Assert.Contains(v.Reasons, r => r.Contains("second placement", StringComparison.Ordinal));
    }

    [Fact]
    public void Decide_DistantRunnerUp_StillAccepted() =>
        Assert.Equal(PairStatus.Accepted, PairDecision.Decide(Evidence(consensus: 100, runnerUp: 20), Options).Status);

    [Fact]
    public void Decide_LowRatio_Weak() =>
        Assert.Equal(PairStatus.Weak, PairDecision.Decide(Evidence(consensus: 30, matches: 400), Options).Status);

    [Fact]
    public void Decide_LargeCornerSigma_Weak() =>
        Assert.Equal(PairStatus.Weak, PairDecision.Decide(Evidence(sigma: 45), Options).Status);

    [Fact]
    public void Decide_BrownLoweNotMet_RemarkOnly()
    {
        // 400 of 2000 (Brown and Lowe, IJCV 2007: needs > 8 + 0.3 x 2000 = 608).
        var v = PairDecision.Decide(Evidence(consensus: 400, matches: 2000), Options);
        Assert.Equal(PairStatus.Accepted, v.Status);
        Assert.Contains(v.Reasons, r => r.StartsWith("remark: Brown and Lowe", StringComparison.Ordinal));
    }
}
