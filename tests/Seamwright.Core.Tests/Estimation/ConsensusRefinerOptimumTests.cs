using Seamwright.Core.Estimation;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Estimation;

public class ConsensusRefinerOptimumTests(ITestOutputHelper output)
{
    private const double Threshold = 3;

    [Fact]
    public void Refine_HardSmallProblems_ReachesAtLeast97PercentOfExactOptimumOnAverage()
    {
        // The exact program's cost grows steeply with the match count (measured: a 40-match
        // homography takes minutes, a 20-match one about a second), so the homography problems are smaller.
        var cases = new (MotionModel Model, ulong Seed, int Matches)[]
        {
            (MotionModel.Homography, 1, 20), (MotionModel.Homography, 2, 20), (MotionModel.Homography, 3, 20), (MotionModel.Homography, 4, 20),
            (MotionModel.Affine, 5, 28), (MotionModel.Affine, 6, 28), (MotionModel.Similarity, 7, 32), (MotionModel.Translation, 8, 40),
        };
        double sumSampling = 0, sumRefined = 0, sumProject = 0, sumProjectRefined = 0;
        foreach (var (model, seed, count) in cases)
        {
            // 45 % inliers (noise 1.3 px against a 3 px threshold), 30 % decoys 7 px away, 25 % gross outliers.
            int inliers = count * 9 / 20, decoys = count * 3 / 10;
            var matches = HardConsensusProblems.Generate(model, seed, inliers, decoys, count - inliers - decoys, noise: 1.3, decoyShift: 7);
            // Plain RANSAC with the standard 99 % confidence bound (no local optimisation) as the sampling stage.
            var initial = PlainRansac.Estimate(matches, model, Threshold, seed, maxIterations: 1000);
            var watch = System.Diagnostics.Stopwatch.StartNew();
            var refined = ConsensusRefiner.Refine(matches, initial.Model, model, Threshold, new ConsensusRefinerOptions());
            // Reported beside it: the project's own sampler (uniform, with local optimisation) and its refinement.
            var project = PairEstimator.Sample(matches, new EstimationOptions { Model = model, Seed = seed, Sampler = SamplerKind.Uniform });
            var projectRefined = project.Model is { } pm
                ? ConsensusRefiner.Refine(matches, pm, model, Threshold, new ConsensusRefinerOptions())
                : null;
            int projectConsensus = project.Model is { } pm2 ? PlainRansac.Count(matches, pm2, Threshold) : 0;
            var exact = ExactMaxConsensus.Solve(matches, model, Threshold, new ExactMaxConsensusOptions(), refined.Transform);
            Assert.True(exact.ProvenOptimal, $"{model} seed {seed}: optimum not proven ({exact.Nodes} nodes)");
            // Reference: the optimal polygon model scored on the round disc (never below the polygon optimum).
            int optimum = Math.Max(exact.DiscConsensus, exact.PolygonConsensus);
            // Shares are capped at 1: a refined disc count above the polygon optimum must not hide a shortfall elsewhere.
            double sampling = Math.Min(1, (double)initial.Consensus / optimum), share = Math.Min(1, (double)refined.ConsensusAfter / optimum);
            sumSampling += sampling;
            sumRefined += share;
            sumProject += Math.Min(1, (double)projectConsensus / optimum);
            sumProjectRefined += Math.Min(1, (double)(projectRefined?.ConsensusAfter ?? 0) / optimum);
            output.WriteLine($"{model,-11} seed {seed} n={count}: sampling {initial.Consensus}, refined {refined.ConsensusAfter} ({refined.LinearPrograms} LPs), optimum polygon {exact.PolygonConsensus} disc {exact.DiscConsensus} ({exact.Nodes} nodes, {watch.ElapsedMilliseconds} ms): {sampling:P1} -> {share:P1}; project sampler {projectConsensus} -> {projectRefined?.ConsensusAfter}");
        }
        double meanSampling = sumSampling / cases.Length, meanRefined = sumRefined / cases.Length;
        output.WriteLine($"mean share of optimum: sampling alone {meanSampling:P1}, refined {meanRefined:P1}; "
            + $"project sampler alone {sumProject / cases.Length:P1}, refined {sumProjectRefined / cases.Length:P1}");
        Assert.True(meanRefined >= 0.97, $"refined reaches {meanRefined:P1} of the optimum on average");
    }
}
