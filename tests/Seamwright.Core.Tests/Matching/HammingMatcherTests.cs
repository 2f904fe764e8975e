using Seamwright.Core.Estimation;
using Seamwright.Core.Features;
using Seamwright.Core.Matching;

namespace Seamwright.Core.Tests.Matching;

public class HammingMatcherTests
{
    private static Descriptor256 Flip(Descriptor256 d, int bits)
    {
        ulong mask = bits >= 64 ? ulong.MaxValue : (1UL << bits) - 1;
        return d with { W0 = d.W0 ^ mask };
    }

    private static Descriptor256[] Random(int n, ulong seed)
    {
        var r = new SplitMix64Stream(seed);
        return [.. Enumerable.Range(0, n).Select(_ => new Descriptor256(r.Next(), r.Next(), r.Next(), r.Next()))];
    }

    [Fact]
    public void Match_NoisyCopies_FindsEveryPairBestFirst()
    {
        var a = Random(50, 1);
        var b = a.Select((d, i) => Flip(d, i % 20)).Reverse().ToArray();
        var result = HammingMatcher.Match(a, b, new MatchOptions());
        Assert.Equal(50, result.Matches.Length);
        Assert.All(result.Matches, m => Assert.Equal(49 - m.IndexA, m.IndexB));
        for (int i = 1; i < result.Matches.Length; i++)
        {
            Assert.True(result.Matches[i - 1].Ratio <= result.Matches[i].Ratio);
        }
    }

    [Fact]
    public void Match_TwoEquallyGoodPartners_RejectedByRatioTestAndCounted()
    {
        var a = Random(1, 2);
        var b = new[] { Flip(a[0], 4), a[0] with { W3 = a[0].W3 ^ 0xF } };
        var result = HammingMatcher.Match(a, b, new MatchOptions());
        Assert.Empty(result.Matches);
        Assert.Equal(1, result.AmbiguousCount);
    }

    [Fact]
    public void Match_SameCornerOnTwoLevels_NotItsOwnRival()
    {
        var a = Random(1, 3);
        var b = new[] { Flip(a[0], 4), a[0] with { W3 = a[0].W3 ^ 0xF } };
        var ka = new[] { new Keypoint(10, 10, 1, 0, 1, 0) };
        var kb = new[] { new Keypoint(50, 50, 1, 0, 1, 0), new Keypoint(50.5f, 50, 1.25f, 0, 1, 1) };
        var result = HammingMatcher.Match(a, b, ka, kb, new MatchOptions());
        Assert.Single(result.Matches);
    }

    [Fact]
    public void Match_NotMutual_Dropped()
    {
        // b[0] is a's best partner for both a[0] (at 10 bits) and a[1] (at 12 bits, a distinct second at 60): only a[0] keeps it.
        var a = Random(1, 4);
        var a1 = Flip(a[0], 22);
        var b = new[] { Flip(a[0], 10), Flip(a[0], 64) with { W1 = ~a[0].W1 } };
        var result = HammingMatcher.Match([a[0], a1], b, new MatchOptions { MaxRatio = 1.0 });
        Assert.Single(result.Matches);
        Assert.Equal(0, result.Matches[0].IndexA);
    }
}
