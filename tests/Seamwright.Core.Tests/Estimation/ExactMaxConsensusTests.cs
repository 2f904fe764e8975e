using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Tests.Estimation;

public class ExactMaxConsensusTests
{
    private const double Threshold = 3;

    [Fact]
    public void Solve_TranslationProblem_AtLeastTheBestOfAFineGridSearch()
    {
        var matches = HardConsensusProblems.Generate(MotionModel.Translation, 61, inliers: 12, decoys: 8, gross: 10, noise: 1.3, decoyShift: 5);

        var exact = ExactMaxConsensus.Solve(matches, MotionModel.Translation, Threshold, new ExactMaxConsensusOptions());

        // Brute force over translations on a 0.1 px grid around every match's own shift, counted
        // with the same inscribed octagon (apothem t cos(pi/8)): a lower bound on the optimum.
        double apothem = Threshold * Math.Cos(Math.PI / 8);
        int best = 0;
        foreach (var m in matches)
        {
            for (double dx = -3; dx <= 3; dx += 0.1)
            {
                for (double dy = -3; dy <= 3; dy += 0.1)
                {
                    double tx = m.X2 - m.X1 + dx, ty = m.Y2 - m.Y1 + dy;
                    best = Math.Max(best, matches.Count(q => InOctagon(q.X2 - q.X1 - tx, q.Y2 - q.Y1 - ty, apothem * 0.999)));
                }
            }
        }
        Assert.True(exact.ProvenOptimal);
        Assert.True(exact.PolygonConsensus >= best, $"exact {exact.PolygonConsensus} < grid {best}");
        Assert.True(exact.UpperBound >= exact.PolygonConsensus);
        Assert.NotNull(exact.Transform);
        Assert.True(exact.DiscConsensus >= exact.PolygonConsensus);
        Assert.Equal(exact.DiscConsensus, PlainRansac.Count(matches, exact.Transform.Value, Threshold));
    }

    [Theory]
    [InlineData(MotionModel.Similarity)]
    [InlineData(MotionModel.Homography)]
    public void Solve_SmallProblem_NotBelowTheRefinedModelsPolygonCount(MotionModel model)
    {
        var matches = HardConsensusProblems.Generate(model, 62, inliers: 8, decoys: 4, gross: 4, noise: 1.0, decoyShift: 6);
        var initial = PlainRansac.Estimate(matches, model, Threshold, 62, maxIterations: 200);
        var refined = ConsensusRefiner.Refine(matches, initial.Model, model, Threshold, new ConsensusRefinerOptions());

        var exact = ExactMaxConsensus.Solve(matches, model, Threshold, new ExactMaxConsensusOptions());

        // The refined model's count inside the same octagon (its disc count may be higher by data in the rim).
        var rows = new PolygonInequalities(matches, model, Threshold, 8, 1e-3);
        var theta = new double[rows.ParameterCount];
        Assert.True(rows.TryToParameters(refined.Transform, theta));
        int refinedPolygon = Enumerable.Range(0, matches.Length)
            .Count(i => rows.Slack(i, theta) <= 1e-9 * rows.Radius && rows.Depth(i, theta) >= rows.Tau);
        Assert.True(exact.ProvenOptimal);
        Assert.True(exact.PolygonConsensus >= refinedPolygon, $"exact {exact.PolygonConsensus}, refined {refinedPolygon}");
        Assert.True(exact.DiscConsensus >= exact.PolygonConsensus);
    }

    [Fact]
    public void Solve_TooManyMatches_Throws()
    {
        var matches = HardConsensusProblems.Generate(MotionModel.Affine, 63, inliers: 40, decoys: 0, gross: 30, noise: 1.0, decoyShift: 0);
        Assert.Throws<ArgumentException>(() => ExactMaxConsensus.Solve(matches, MotionModel.Affine, Threshold, new ExactMaxConsensusOptions()));
    }

    private static bool InOctagon(double x, double y, double apothem)
    {
        for (int k = 0; k < 8; k++)
        {
            double a = 2 * Math.PI * k / 8;
            if (Math.Cos(a) * x + Math.Sin(a) * y > apothem)
            {
                return false;
            }
        }
        return true;
    }
}
