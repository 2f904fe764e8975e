using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Tests.Planning;

/// <summary>The index behind <c>all</c> pairing gives exactly the full scan's partners, with far fewer comparisons.</summary>
public sealed class CoarseIndexTests(Xunit.Abstractions.ITestOutputHelper output)
{
    [Fact]
    public void Best_ClusteredSignatures_EqualsFullScanWithFewerComparisons()
    {
        // 1,500 signatures in 60 clusters (a tight spread around random unit centres), seeded.
        var rng = new Xoshiro256StarStar(20261202);
        var centres = Enumerable.Range(0, 60).Select(_ => Enumerable.Range(0, CoarseSignature.Length).Select(_ => (float)rng.NextDouble()).ToArray()).ToArray();
        var sigs = Enumerable.Range(0, 1500).Select(i => centres[i % 60].Select(v => v + (float)(0.05 * (rng.NextDouble() - 0.5))).ToArray()).ToList();
        var index = new CoarseIndex(sigs);
        for (int i = 0; i < sigs.Count; i++)
        {
            var expected = Enumerable.Range(0, sigs.Count).Where(j => j != i)
                .Select(j => (Sim: PairPlanner.Cosine(sigs[i], sigs[j]), J: j)).Where(t => t.Sim >= 0.5)
                .OrderByDescending(t => t.Sim).ThenBy(t => t.J).Take(4).Select(t => t.J).ToList();
            Assert.Equal(expected, index.Best(i, 4, 0.5, sigs));
        }
        long full = (long)sigs.Count * (sigs.Count - 1);
        output.WriteLine($"{index.Comparisons} comparisons for 1500 signatures (full scan {full}: {(double)index.Comparisons / full:P1})");
        Assert.True(index.Comparisons < full / 4, $"{index.Comparisons} comparisons against {full} for the full scan");
    }

    [Fact]
    public void Plan_AllWithIndex_SameAsSmallSetRule()
    {
        var rng = new Xoshiro256StarStar(7);
        var imgs = Enumerable.Range(0, 300).Select(i => new PlanImage("i" + i, null,
            Enumerable.Range(0, CoarseSignature.Length).Select(_ => (float)rng.NextDouble()).ToArray())).ToList();
        var settings = new PairingSettings { Mode = PairingMode.All, AllMaxPartners = 4, AllMinSimilarity = 0.5 };
        var indexed = PairPlanner.Plan(settings, imgs).Pairs;
        var scanned = PairPlanner.AllByFullScan(settings, imgs).Pairs;
        Assert.Equal(scanned, indexed);
    }
}
