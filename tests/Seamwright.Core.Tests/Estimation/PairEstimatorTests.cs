using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Estimation;

public class PairEstimatorTests
{
    private static readonly ImageSize A = SyntheticSweepTests.SizeA;
    private static readonly ImageSize B = SyntheticSweepTests.SizeB;

    private static SyntheticMatchSet Set(ulong seed, int count = 200, double outliers = 0.5, double noise = 1) =>
        SyntheticMatches.Generate(SyntheticSweepTests.TruthFor(MotionModel.Homography), A, B, count, outliers, noise, seed);

    /// <summary>Everything but the timings, as one comparable string (round-trip number formatting).</summary>
    internal static string Fingerprint(PairEstimate e) => string.Join("|",
        e.Model, e.Transform is { } h ? string.Join(",", h.ToRowMajor().Select(v => v.ToString("R", System.Globalization.CultureInfo.InvariantCulture))) : "null",
        e.MatchCount, string.Join(",", e.InlierIndices), e.Consensus, e.Threshold, e.Seed, e.Status, string.Join(";", e.Reasons),
        e.CornerSigmaPx.ToString("R", System.Globalization.CultureInfo.InvariantCulture), e.RmsResidualPx.ToString("R", System.Globalization.CultureInfo.InvariantCulture),
        e.Iterations, e.LpCount, string.Join(";", e.Terminations));

    [Fact]
    public void Estimate_SameInputsTwice_BitIdentical()
    {
        var set = Set(1);
        var a = PairEstimator.Estimate(set.Matches, A, B, EstimationOptions.Default);
        var b = PairEstimator.Estimate(set.Matches, A, B, EstimationOptions.Default);
        Assert.Equal(Fingerprint(a), Fingerprint(b));
    }

    [Fact]
    public void Estimate_UnderParallelLoad_SameAsSequential()
    {
        var sets = Enumerable.Range(0, 6).Select(i => Set((ulong)(50 + i))).ToArray();
        var expected = sets.Select(s => Fingerprint(PairEstimator.Estimate(s.Matches, A, B, EstimationOptions.Default))).ToArray();
        var actual = new string[sets.Length * 2];
        Parallel.For(0, actual.Length, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i =>
            actual[i] = Fingerprint(PairEstimator.Estimate(sets[i % sets.Length].Matches, A, B, EstimationOptions.Default)));
        for (int i = 0; i < actual.Length; i++)
        {
            Assert.Equal(expected[i % sets.Length], actual[i]);
        }
    }

    [Fact]
    public void Estimate_DifferentSeeds_BothFindTheTruth()
    {
        var set = Set(2);
        var corners = Transform2D.Corners(A.Width, A.Height);
        foreach (ulong seed in new ulong[] { 1, 2, 99 })
        {
            var e = PairEstimator.Estimate(set.Matches, A, B, EstimationOptions.Default with { Seed = seed });
            Assert.Equal(PairStatus.Accepted, e.Status);
            Assert.True(Transform2D.MaxPointDistance(e.Transform!.Value, set.Truth, corners) < 3);
        }
    }

    [Fact]
    public void Estimate_UniformSampler_FindsTheTruth()
    {
        var set = Set(3, outliers: 0.7);
        var e = PairEstimator.Estimate(set.Matches, A, B, EstimationOptions.Default with { Sampler = SamplerKind.Uniform });
        Assert.Equal(PairStatus.Accepted, e.Status);
        Assert.True(e.Consensus.Final >= 50);
    }

    [Fact]
    public void Estimate_FewerMatchesThanMinimal_RejectedWithoutModel()
    {
        var set = Set(4, count: 3);
        var e = PairEstimator.Estimate(set.Matches, A, B, EstimationOptions.Default);
        Assert.Null(e.Transform);
        Assert.Equal(PairStatus.Rejected, e.Status);
        Assert.Contains(e.Reasons, r => r.Contains("no homography model", StringComparison.Ordinal));
    }

    [Fact]
    public void Estimate_RefineOff_RefinedEqualsSampling()
    {
        var set = Set(5);
        var e = PairEstimator.Estimate(set.Matches, A, B, EstimationOptions.Default with { Refine = false });
        Assert.Equal(e.Consensus.Sampling, e.Consensus.Refined);
        Assert.Equal(0, e.LpCount);
        Assert.Contains("refinement: off", e.Terminations);
    }

    [Fact]
    public void Estimate_Always_FillsRecordConsistently()
    {
        var set = Set(6);
        var e = PairEstimator.Estimate(set.Matches, A, B, EstimationOptions.Default);
        Assert.Equal(set.Matches.Length, e.MatchCount);
        Assert.Equal(e.Consensus.Final, e.InlierIndices.Length);
        Assert.True(e.InlierIndices.SequenceEqual(e.InlierIndices.Order()));
        Assert.True(e.Consensus.Refined >= e.Consensus.Sampling);
        Assert.True(e.Iterations > 0);
        Assert.True(e.RmsResidualPx is > 0 and <= 3);
        Assert.True(e.CornerSigmaPx is > 0 and < 3);
        Assert.Equal(3, e.Terminations.Length);
        Assert.True(e.TimingsMs.Total >= e.TimingsMs.Sampling);
    }

    [Fact]
    public void Estimate_RepeatedPattern_WeakWithRunnerUpReason()
    {
        // Two shifted copies of the same tiles: 150 matches agree with one shift, 120 with another
        // 200 px away (a periodic texture), plus 30 random matches.
        var rng = new Xoshiro256StarStar(8);
        var list = new List<Correspondence>();
        for (int i = 0; i < 300; i++)
        {
            double x = rng.NextDouble() * 600, y = rng.NextDouble() * 800;
            list.Add(i switch
            {
                < 150 => new Correspondence(x, y, x + 400, y + 10),
                < 270 => new Correspondence(x, y, x + 200, y + 10),
                _ => new Correspondence(x, y, rng.NextDouble() * 1199, rng.NextDouble() * 899),
            });
        }
        var options = EstimationOptions.Default with { Model = MotionModel.Translation };
        var e = PairEstimator.Estimate(list.ToArray(), A, B, options);
        Assert.Equal(150, e.Consensus.Final);
        Assert.Equal(120, e.Consensus.RunnerUp);
        Assert.Equal(PairStatus.Weak, e.Status);
        Assert.Contains(e.Reasons, r => r.Contains("second placement", StringComparison.Ordinal));
    }

    [Fact]
    public void Estimate_ClearSingleModel_NoRunnerUpAmbiguity()
    {
        var set = Set(9, outliers: 0.3, noise: 0.5);
        var e = PairEstimator.Estimate(set.Matches, A, B, EstimationOptions.Default);
        Assert.True(e.Consensus.RunnerUp < e.Consensus.Final / 4);
        Assert.Equal(PairStatus.Accepted, e.Status);
    }

    [Fact]
    public void Repolish_RelocalisedMatches_UpdatesFinalAndKeepsEarlierStages()
    {
        var noisy = Set(10, noise: 2);
        var first = PairEstimator.Estimate(noisy.Matches, A, B, EstimationOptions.Default);
        // Re-localised tie points: the same matches, inliers now exact.
        var exact = noisy.Matches.Select((m, i) => noisy.IsInlier[i]
            ? new Correspondence(m.X1, m.Y1, noisy.Truth.Apply(m.X1, m.Y1).X, noisy.Truth.Apply(m.X1, m.Y1).Y)
            : m).ToArray();
        var again = PairEstimator.Repolish(exact, first, A, B, EstimationOptions.Default);
        Assert.Equal(first.Consensus.Sampling, again.Consensus.Sampling);
        Assert.True(again.Consensus.Final >= first.Consensus.Final);
        Assert.True(again.RmsResidualPx < 1e-6);
        Assert.Contains(again.Terminations, t => t.StartsWith("re-polish", StringComparison.Ordinal));
    }

    [Fact]
    public void Polish_StartingNearTruth_ReselectsTheInliers()
    {
        var set = Set(11, noise: 0.5);
        var start = set.Truth * Transform2D.Translation(0.8, -0.6);
        var p = PairEstimator.Polish(set.Matches, start, A, EstimationOptions.Default);
        Assert.Equal(set.InlierCount, p.Consensus);
        Assert.StartsWith("inlier set stable", p.Termination, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("threshold")]
    [InlineData("confidence")]
    [InlineData("iterations")]
    public void Estimate_InvalidOptions_ThrowsNamingTheSetting(string which)
    {
        var o = which switch
        {
            "threshold" => EstimationOptions.Default with { Threshold = -1 },
            "confidence" => EstimationOptions.Default with { Confidence = 1 },
            _ => EstimationOptions.Default with { MaxIterations = 0 },
        };
        var ex = Assert.Throws<ArgumentException>(() => PairEstimator.Estimate(Set(12).Matches, A, B, o));
        Assert.Contains(which, ex.Message, StringComparison.OrdinalIgnoreCase);
    }
}
