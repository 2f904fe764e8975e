using Seamwright.Core.Estimation;

namespace Seamwright.Core.Tests.Estimation;

public class Xoshiro256StarStarTests
{
    [Fact]
    public void SplitMix64_StateZero_GivesPublishedFirstOutput()
    {
        // First output of splitmix64 from state 0 (Steele, Lea, Flood 2014 reference code; value from memory).
        ulong state = 0;
        Assert.Equal(0xE220A8397B1DCDAFUL, Seamwright.Core.Estimation.SplitMix64.Next(ref state));
    }

    [Fact]
    public void NextUInt64_SeedOne_MatchesPinnedSequence()
    {
        // Pinned by an independent Python transcription of the published algorithm: any change
        // here breaks the reproducibility promise for every stored result.
        var rng = new Xoshiro256StarStar(1);
        Assert.Equal(0xB3F2AF6D0FC710C5UL, rng.NextUInt64());
        Assert.Equal(0x853B559647364CEAUL, rng.NextUInt64());
        Assert.Equal(0x92F89756082A4514UL, rng.NextUInt64());
    }

    [Fact]
    public void NextInt_ManyDraws_StaysInRangeAndCoversItEvenly()
    {
        var rng = new Xoshiro256StarStar(42);
        var counts = new int[10];
        for (int i = 0; i < 100_000; i++)
        {
            int k = rng.NextInt(10);
            Assert.InRange(k, 0, 9);
            counts[k]++;
        }
        // Chi-square with 9 degrees of freedom; 27.9 is the 0.999 quantile (statistics tables).
        double chi2 = counts.Sum(c => (c - 10_000.0) * (c - 10_000.0) / 10_000.0);
        Assert.True(chi2 < 27.9, $"chi-square {chi2:0.0}");
    }

    [Fact]
    public void NextDouble_Draws_LieInUnitInterval()
    {
        var rng = new Xoshiro256StarStar(7);
        for (int i = 0; i < 10_000; i++)
        {
            Assert.InRange(rng.NextDouble(), 0.0, 0.9999999999999999);
        }
    }

    [Fact]
    public void PairSeed_SamePairSameSeed_DifferentOtherwise()
    {
        ulong a = PairSeed.Derive(1, "tile_01.png", "tile_02.png");
        Assert.Equal(a, PairSeed.Derive(1, "tile_01.png", "tile_02.png"));
        Assert.NotEqual(a, PairSeed.Derive(2, "tile_01.png", "tile_02.png"));
        Assert.NotEqual(a, PairSeed.Derive(1, "tile_02.png", "tile_01.png"));
        Assert.NotEqual(a, PairSeed.Derive(1, "tile_01.png", "tile_03.png"));
        // The separator keeps ("ab", "c") and ("a", "bc") apart.
        Assert.NotEqual(PairSeed.StableHash("ab", "c"), PairSeed.StableHash("a", "bc"));
    }

    [Fact]
    public void StableHash_KnownInput_IsPinned()
    {
        // 64-bit FNV-1a of "a\0b" (pinned: the hash must never change between builds or processes).
        ulong h = 0xCBF29CE484222325UL;
        foreach (byte b in "a\0b"u8)
        {
            h = (h ^ b) * 0x100000001B3UL;
        }
        Assert.Equal(h, PairSeed.StableHash("a", "b"));
    }
}
