using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Estimation;

/// <summary>
/// The homogr set (Lebeda, Matas, Chum, BMVC 2012; ../shared/data/homogr): estimate from the
/// label-0 rows, score with the label-1 rows, at 3 px. Reference figures of the best
/// general-purpose method from the set's README: total consensus 1737, median error 1.32 px.
/// </summary>
public class HomogrSetTests(ITestOutputHelper output)
{
    private static IReadOnlyList<HomogrPair>? Load()
    {
        var set = HomogrSet.TryLoad();
        if (set is null)
        {
            Assert.False(RepoPaths.IsCi, "homogr set missing at " + RepoPaths.HomogrFolder + " (required when CI=true)");
        }
        return set;
    }

    internal static ImageSize BoundingSize(IEnumerable<(double X, double Y)> points)
    {
        double w = 1, h = 1;
        foreach (var (x, y) in points)
        {
            w = Math.Max(w, x + 1);
            h = Math.Max(h, y + 1);
        }
        return new ImageSize((int)Math.Ceiling(w), (int)Math.Ceiling(h));
    }

    private (int Sampling, int Refined, int Final, double Median, double Worst, int Accepted) Run(IReadOnlyList<HomogrPair> set, EstimationOptions options)
    {
        int sampling = 0, refined = 0, final = 0, accepted = 0;
        var errors = new List<double>();
        foreach (var pair in set)
        {
            var sizeA = BoundingSize(pair.Tentative.Select(m => (m.X1, m.Y1)));
            var sizeB = BoundingSize(pair.Tentative.Select(m => (m.X2, m.Y2)));
            var e = PairEstimator.Estimate(pair.Tentative, sizeA, sizeB, options);
            double err = e.Transform is { } h ? pair.ValidationError(h) : double.PositiveInfinity;
            errors.Add(err);
            sampling += e.Consensus.Sampling;
            refined += e.Consensus.Refined;
            final += e.Consensus.Final;
            accepted += e.Status == PairStatus.Accepted ? 1 : 0;
            output.WriteLine($"{pair.Name,-14} n={e.MatchCount,4} sampling={e.Consensus.Sampling,4} refined={e.Consensus.Refined,4} final={e.Consensus.Final,4} runnerUp={e.Consensus.RunnerUp,3} err={err,7:0.000} px sigma={e.CornerSigmaPx,6:0.00} it={e.Iterations,5} lp={e.LpCount,3} {e.Status} {string.Join("; ", e.Reasons)}");
        }
        errors.Sort();
        double median = (errors[7] + errors[8]) / 2;
        output.WriteLine($"total sampling={sampling} refined={refined} final={final} median error={median:0.000} px worst={errors[^1]:0.000} px accepted={accepted}/16");
        return (sampling, refined, final, median, errors[^1], accepted);
    }

    [Fact]
    public void Estimate_HomogrSetSamplingOnly_ReachesSamplingTargets()
    {
        var set = Load();
        if (set is null)
        {
            output.WriteLine("SKIPPED: homogr set absent at " + RepoPaths.HomogrFolder);
            return;
        }
        var r = Run(set, EstimationOptions.Default with { Refine = false });
        // Targets for sampling alone (the refiner adds the rest): total >= 1700, no pair above 10 px
        // (the set's failure level, from its README).
        Assert.True(r.Sampling >= 1700, $"sampling total consensus {r.Sampling} < 1700");
        Assert.True(r.Worst <= 10, $"a pair has validation error {r.Worst:0.00} px > 10 px");
    }

    [Fact]
    public void Estimate_HomogrSetWithRefinement_ReachesIssueTargets()
    {
        var set = Load();
        if (set is null)
        {
            output.WriteLine("SKIPPED: homogr set absent at " + RepoPaths.HomogrFolder);
            return;
        }
        var r = Run(set, EstimationOptions.Default);
        // Issue 2 targets at 3 px (general-purpose best: 1737 and 1.32 px, from the set's README).
        Assert.True(r.Refined >= 1790, $"total refined consensus {r.Refined} < 1790");
        // Measured with the default polish tolerance (0.06) and candidate filter (5 t from 100 matches): refined 1816,
        // final 1764, median 1.301 px, worst 5.05 px (BruggeTower).
        Assert.True(r.Final >= 1764, $"total final consensus {r.Final} < 1764");
        Assert.True(r.Median <= 1.40, $"median validation error {r.Median:0.000} px > 1.40 px");
        Assert.True(r.Worst <= 10, $"a pair has validation error {r.Worst:0.00} px > 10 px");
    }
}
