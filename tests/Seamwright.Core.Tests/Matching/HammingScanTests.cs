using Seamwright.Core.Estimation;
using Seamwright.Core.Features;
using Seamwright.Core.Matching;

namespace Seamwright.Core.Tests.Matching;

public class HammingScanTests
{
    /// <summary>Descriptors near a few centres (many equal and near-equal distances, so ties and the third best matter).</summary>
    private static Descriptor256[] Clustered(int n, ulong seed)
    {
        var r = new SplitMix64Stream(seed);
        var centres = Enumerable.Range(0, 5).Select(_ => new Descriptor256(r.Next(), r.Next(), r.Next(), r.Next())).ToArray();
        return [.. Enumerable.Range(0, n).Select(_ =>
        {
            var c = centres[(int)(r.Next() % 5)];
            ulong flip() => (1UL << (int)(r.Next() % 64)) | (1UL << (int)(r.Next() % 64));
            return new Descriptor256(c.W0 ^ flip(), c.W1 ^ flip(), c.W2, c.W3 ^ ((r.Next() % 3 == 0) ? flip() : 0));
        })];
    }

    [Theory]
    [InlineData(1, 1)]
    [InlineData(7, 3)]
    [InlineData(40, 37)]
    [InlineData(203, 333)]
    public void Run_VectorPath_EqualsScalarPathIncludingTies(int na, int nb)
    {
        var a = Clustered(na, 11);
        var b = Clustered(nb, 12);
        var (topV, bestV, indexV) = Scan(a, b, HammingScan.Path.Best);
        var (topS, bestS, indexS) = Scan(a, b, HammingScan.Path.Scalar);
        Assert.Equal(topS, topV);
        Assert.Equal(bestS, bestV);
        Assert.Equal(indexS, indexV);
    }

    [Fact]
    public void Run_BestPath_FindsTheBruteForceNearest()
    {
        var a = Clustered(30, 21);
        var b = Clustered(50, 22);
        var (top, best, index) = Scan(a, b, HammingScan.Path.Best);
        for (int i = 0; i < a.Length; i++)
        {
            var order = Enumerable.Range(0, b.Length).OrderBy(j => Descriptor256.Hamming(a[i], b[j])).ThenBy(j => j).ToArray();
            Assert.Equal((Descriptor256.Hamming(a[i], b[order[0]]), order[0]), top[3 * i]);
            Assert.Equal((Descriptor256.Hamming(a[i], b[order[2]]), order[2]), top[3 * i + 2]);
        }
        for (int j = 0; j < b.Length; j++)
        {
            int first = Enumerable.Range(0, a.Length).OrderBy(i => Descriptor256.Hamming(a[i], b[j])).ThenBy(i => i).First();
            Assert.Equal(first, index[j]);
            Assert.Equal(Descriptor256.Hamming(a[first], b[j]), best[j]);
        }
    }

    private static ((int, int)[], int[], int[]) Scan(Descriptor256[] a, Descriptor256[] b, HammingScan.Path path)
    {
        var top = new (int D, int J)[3 * a.Length];
        var best = new int[b.Length];
        var index = new int[b.Length];
        HammingScan.Run(a, b, top, best, index, path);
        return (top, best, index);
    }
}
