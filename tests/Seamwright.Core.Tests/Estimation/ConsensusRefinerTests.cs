using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Tests.Estimation;

public class ConsensusRefinerTests
{
    private const double Threshold = 3;

    public static TheoryData<MotionModel> Models => new(Enum.GetValues<MotionModel>());

    [Theory]
    [MemberData(nameof(Models))]
    public void Refine_ShiftedTrueModel_RecoversInliersAndStaysInFamily(MotionModel model)
    {
        var rng = new TestRandom(11 + (ulong)model);
        var truth = HardConsensusProblems.TrueModel(model, rng);
        var matches = Clean(rng, truth, inliers: 40, gross: 20, noise: 0.5);
        var initial = Transform2D.Translation(2.5, -2) * truth;

        var r = ConsensusRefiner.Refine(matches, initial, model, Threshold, new ConsensusRefinerOptions());

        Assert.True(r.ConsensusBefore < 36, $"the shifted model should lose inliers, had {r.ConsensusBefore}");
        Assert.True(r.ConsensusAfter >= 39, $"{model}: {r.ConsensusBefore} -> {r.ConsensusAfter} ({r.Termination})");
        Assert.True(r.LinearPrograms > 0);
        Assert.True(Transform2D.MaxPointDistance(r.Transform, truth, Transform2D.Corners(640, 480)) < 2 * Threshold);
        AssertInFamily(model, r.Transform);
    }

    [Theory]
    [MemberData(nameof(Models))]
    public void Refine_HardProblemsFromSampling_NeverLowersConsensus(MotionModel model)
    {
        for (ulong seed = 20; seed < 24; seed++)
        {
            var matches = HardConsensusProblems.Generate(model, seed, inliers: 20, decoys: 12, gross: 18, noise: 1.0, decoyShift: 8);
            var initial = PlainRansac.Estimate(matches, model, Threshold, seed, maxIterations: 30);
            foreach (var start in new[] { initial.Model, Transform2D.Identity, new Transform2D(1, 0, 0, 0, 1, 0, 0.01, 0, -1) })
            {
                var r = ConsensusRefiner.Refine(matches, start, model, Threshold, new ConsensusRefinerOptions());
                Assert.Equal(PlainRansac.Count(matches, start, Threshold), r.ConsensusBefore);
                Assert.Equal(PlainRansac.Count(matches, r.Transform, Threshold), r.ConsensusAfter);
                Assert.True(r.ConsensusAfter >= r.ConsensusBefore, $"{model} seed {seed}: {r.ConsensusBefore} -> {r.ConsensusAfter}");
                if (r.ConsensusAfter == r.ConsensusBefore)
                {
                    Assert.Equal(start, r.Transform);
                }
            }
        }
    }

    [Theory]
    [MemberData(nameof(Models))]
    public void Refine_SameInputTwice_BitIdenticalResult(MotionModel model)
    {
        var matches = HardConsensusProblems.Generate(model, 31, inliers: 60, decoys: 30, gross: 60, noise: 1.0, decoyShift: 8);
        var initial = PlainRansac.Estimate(matches, model, Threshold, 31, maxIterations: 50);

        var a = ConsensusRefiner.Refine(matches, initial.Model, model, Threshold, new ConsensusRefinerOptions());
        var b = ConsensusRefiner.Refine(matches, initial.Model, model, Threshold, new ConsensusRefinerOptions());

        Assert.Equal(a.Transform.ToRowMajor().Select(BitConverter.DoubleToInt64Bits), b.Transform.ToRowMajor().Select(BitConverter.DoubleToInt64Bits));
        Assert.Equal((a.ConsensusBefore, a.ConsensusAfter, a.LinearPrograms, a.Termination), (b.ConsensusBefore, b.ConsensusAfter, b.LinearPrograms, b.Termination));
    }

    [Fact]
    public void Refine_LinearProgramCap_StopsAtCapAndSaysSo()
    {
        var matches = HardConsensusProblems.Generate(MotionModel.Homography, 41, inliers: 40, decoys: 20, gross: 40, noise: 1.0, decoyShift: 8);
        var initial = PlainRansac.Estimate(matches, MotionModel.Homography, Threshold, 41, maxIterations: 20);

        var r = ConsensusRefiner.Refine(matches, initial.Model, MotionModel.Homography, Threshold, new ConsensusRefinerOptions { MaxLinearPrograms = 2, CandidateRadiusThresholds = double.PositiveInfinity });

        Assert.Equal(2, r.LinearPrograms);
        Assert.Contains("cap", r.Termination, StringComparison.Ordinal);
        Assert.True(r.ConsensusAfter >= r.ConsensusBefore);
    }

    [Fact]
    public void Refine_ManyGrossOutliers_HoldsOnlyNearbyCandidatesAndKeepsConsensus()
    {
        var matches = HardConsensusProblems.Generate(MotionModel.Homography, 43, inliers: 60, decoys: 0, gross: 140, noise: 1.0, decoyShift: 0);
        var initial = PlainRansac.Estimate(matches, MotionModel.Homography, Threshold, 43, maxIterations: 200);

        var filtered = ConsensusRefiner.Refine(matches, initial.Model, MotionModel.Homography, Threshold, new ConsensusRefinerOptions());
        var all = ConsensusRefiner.Refine(matches, initial.Model, MotionModel.Homography, Threshold,
            new ConsensusRefinerOptions { CandidateRadiusThresholds = double.PositiveInfinity });

        Assert.Contains("of 200 matches within 5 thresholds", filtered.Termination, StringComparison.Ordinal);
        Assert.True(filtered.ConsensusAfter >= filtered.ConsensusBefore);
        Assert.True(filtered.LinearPrograms <= all.LinearPrograms, $"{filtered.LinearPrograms} LPs with the filter, {all.LinearPrograms} without");
    }

    [Fact]
    public void Refine_EveryMatchAlreadyInlier_SolvesNoLinearProgram()
    {
        var rng = new TestRandom(5);
        var truth = HardConsensusProblems.TrueModel(MotionModel.Homography, rng);
        var matches = Clean(rng, truth, inliers: 30, gross: 0, noise: 0.2);

        var r = ConsensusRefiner.Refine(matches, truth, MotionModel.Homography, Threshold, new ConsensusRefinerOptions());

        Assert.Equal((30, 30, 0), (r.ConsensusBefore, r.ConsensusAfter, r.LinearPrograms));
        Assert.Equal(truth, r.Transform);
    }

    [Theory]
    [InlineData(2, true)]
    [InlineData(12, false)]
    public void Refine_CandidatesBarelyAboveConsensus_SkipsTheSearch(int near, bool skipped)
    {
        // 300 inliers of the initial model, `near` matches 4 px off it (candidates, not inliers) and gross
        // outliers: the search could gain at most `near` plus the gross matches that land near the model.
        var rng = new TestRandom(7);
        var truth = HardConsensusProblems.TrueModel(MotionModel.Homography, rng);
        var matches = Clean(rng, truth, inliers: 300, gross: 100, noise: 0.3).ToList();
        for (int i = 0; i < near; i++)
        {
            double x = rng.NextDouble() * 640, y = rng.NextDouble() * 480;
            var (u, v) = truth.Apply(x, y);
            matches.Add(new(x, y, u + 4, v));
        }
        int before = PlainRansac.Count(matches.ToArray(), truth, Threshold);
        int candidates = matches.Count(m => TransferError.ForwardSquared(truth, m) <= 25 * Threshold * Threshold);
        Assert.Equal(skipped, candidates - before <= 0.01 * before);

        var r = ConsensusRefiner.Refine(matches.ToArray(), truth, MotionModel.Homography, Threshold, new ConsensusRefinerOptions());
        var searched = ConsensusRefiner.Refine(matches.ToArray(), truth, MotionModel.Homography, Threshold, new ConsensusRefinerOptions { SkipGainShare = 0 });

        Assert.True(searched.LinearPrograms > 0);
        Assert.True(searched.ConsensusAfter >= before);
        if (skipped)
        {
            Assert.Equal((before, before, 0), (r.ConsensusBefore, r.ConsensusAfter, r.LinearPrograms));
            Assert.Equal(truth, r.Transform);
            Assert.Contains("skipped", r.Termination, StringComparison.Ordinal);
            // What the search would have gained is within the bound.
            Assert.True(searched.ConsensusAfter - before <= candidates - before);
        }
        else
        {
            Assert.Equal((searched.Transform, searched.LinearPrograms), (r.Transform, r.LinearPrograms));
        }
    }

    [Fact]
    public void Refine_PolygonWithFewerThanEightSides_Throws()
    {
        var matches = HardConsensusProblems.Generate(MotionModel.Affine, 3, inliers: 10, decoys: 0, gross: 10, noise: 0.5, decoyShift: 0);
        Assert.Throws<ArgumentOutOfRangeException>(() =>
            ConsensusRefiner.Refine(matches, Transform2D.Identity, MotionModel.Affine, Threshold, new ConsensusRefinerOptions { PolygonSides = 6 }));
    }

    internal static Correspondence[] Clean(TestRandom rng, Transform2D truth, int inliers, int gross, double noise)
    {
        var list = new List<Correspondence>();
        for (int i = 0; i < inliers; i++)
        {
            double x = rng.NextDouble() * 640, y = rng.NextDouble() * 480;
            var (u, v) = truth.Apply(x, y);
            // Noise clipped to 1.5 px so every generated inlier is a true inlier at 3 px.
            list.Add(new(x, y, u + Math.Clamp(noise * rng.NextGaussian(), -1.5, 1.5), v + Math.Clamp(noise * rng.NextGaussian(), -1.5, 1.5)));
        }
        for (int i = 0; i < gross; i++)
        {
            list.Add(new(rng.NextDouble() * 640, rng.NextDouble() * 480, rng.NextDouble() * 640, rng.NextDouble() * 480));
        }
        return [.. list];
    }

    private static void AssertInFamily(MotionModel model, Transform2D h)
    {
        if (model == MotionModel.Homography)
        {
            return;
        }
        Assert.Equal((0.0, 0.0, 1.0), (h.M31, h.M32, h.M33));
        if (model == MotionModel.Similarity)
        {
            Assert.Equal(h.M11, h.M22, 12);
            Assert.Equal(h.M12, -h.M21, 12);
        }
        if (model == MotionModel.Translation)
        {
            Assert.Equal((1.0, 0.0, 0.0, 1.0), (h.M11, h.M12, h.M21, h.M22));
        }
    }
}
