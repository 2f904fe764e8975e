using Seamwright.Core.Estimation;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Estimation;

public class ScratchTests(ITestOutputHelper output)
{
    [Fact]
    public void Scratch_Refine()
    {
        var cases = new (MotionModel Model, ulong Seed, int Opt)[]
        {
            (MotionModel.Homography, 1, 22), (MotionModel.Homography, 2, 20), (MotionModel.Homography, 3, 19), (MotionModel.Homography, 4, 18),
            (MotionModel.Affine, 5, 20), (MotionModel.Affine, 6, 19), (MotionModel.Similarity, 7, 18), (MotionModel.Translation, 8, 18),
        };
        double sum = 0;
        foreach (var (model, seed, opt) in cases)
        {
            var matches = HardConsensusProblems.Generate(model, seed, inliers: 18, decoys: 12, gross: 10, noise: 1.3, decoyShift: 7);
            var initial = PlainRansac.Estimate(matches, model, 3, seed, maxIterations: int.Parse(Environment.GetEnvironmentVariable("SCR_IT") ?? "40"));
            var refined = ConsensusRefiner.Refine(matches, initial.Model, model, 3, new ConsensusRefinerOptions { MaxPasses = int.Parse(Environment.GetEnvironmentVariable("SCR_PASS") ?? "1") });
            sum += (double)refined.ConsensusAfter / opt;
            output.WriteLine($"{model} {seed}: {initial.Consensus} -> {refined.ConsensusAfter} / {opt}  LPs {refined.LinearPrograms} {refined.Termination}");
        }
        output.WriteLine($"mean {sum / cases.Length:P1}");
    }
}
public class ScratchMipTests(ITestOutputHelper output)
{
    [Fact]
    public void Scratch_Mip()
    {
        double bound = double.Parse(Environment.GetEnvironmentVariable("SCR_B") ?? "10", System.Globalization.CultureInfo.InvariantCulture);
        int n = int.Parse(Environment.GetEnvironmentVariable("SCR_N") ?? "40");
        foreach (ulong seed in new ulong[] { 2, 4 })
        {
            var model = MotionModel.Homography;
            int inl = n * 18 / 40, dec = n * 12 / 40;
            var matches = HardConsensusProblems.Generate(model, seed, inliers: inl, decoys: dec, gross: n - inl - dec, noise: 1.3, decoyShift: 7);
            var initial = PlainRansac.Estimate(matches, model, 3, seed, maxIterations: 1000);
            var refined = ConsensusRefiner.Refine(matches, initial.Model, model, 3, new ConsensusRefinerOptions());
            var sw = System.Diagnostics.Stopwatch.StartNew();
            var exact = ExactMaxConsensus.Solve(matches, model, 3, new ExactMaxConsensusOptions { ParameterBound = bound }, refined.Transform);
            output.WriteLine($"seed {seed} n {n} B {bound}: refined {refined.ConsensusAfter} exact {exact.PolygonConsensus}/{exact.DiscConsensus} proven {exact.ProvenOptimal} nodes {exact.Nodes} {sw.ElapsedMilliseconds} ms");
        }
    }
}
