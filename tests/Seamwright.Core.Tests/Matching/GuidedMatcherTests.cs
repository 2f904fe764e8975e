using Seamwright.Core.Estimation;
using Seamwright.Core.Features;
using Seamwright.Core.Geometry;
using Seamwright.Core.Matching;

namespace Seamwright.Core.Tests.Matching;

public class GuidedMatcherTests
{
    /// <summary>
    /// 300 features of A at seeded positions; B holds each moved by a known translation with 30 of
    /// 256 descriptor bits flipped (too weak a margin for the unguided ratio test when rivals are
    /// near), plus 300 unrelated features.
    /// </summary>
    private static (Keypoint[] Ka, Descriptor256[] Da, Keypoint[] Kb, Descriptor256[] Db) Scene(Transform2D truth)
    {
        var rng = new SplitMix64Stream(42);
        var ka = new Keypoint[300];
        var da = new Descriptor256[300];
        var kb = new List<Keypoint>();
        var db = new List<Descriptor256>();
        for (int i = 0; i < ka.Length; i++)
        {
            ka[i] = new Keypoint((float)(1000 * rng.NextDouble()), (float)(800 * rng.NextDouble()), 1, 0, 1, 0);
            da[i] = new Descriptor256(rng.Next(), rng.Next(), rng.Next(), rng.Next());
            var (x, y) = truth.Apply(ka[i].X, ka[i].Y);
            ulong flips = 0;
            for (int k = 0; k < 30; k++)
            {
                flips |= 1UL << (int)(rng.Next() % 64);
            }
            kb.Add(new Keypoint((float)x, (float)y, 1, 0, 1, 0));
            db.Add(new Descriptor256(da[i].W0 ^ flips, da[i].W1, da[i].W2, da[i].W3));
            kb.Add(new Keypoint((float)(1000 * rng.NextDouble()), (float)(800 * rng.NextDouble()), 1, 0, 1, 0));
            db.Add(new Descriptor256(rng.Next(), rng.Next(), rng.Next(), rng.Next()));
        }
        return (ka, da, [.. kb], [.. db]);
    }

    [Fact]
    public void Match_TrueTransform_FindsTheMovedFeatures()
    {
        var truth = Transform2D.Translation(37.5, -12.25);
        var (ka, da, kb, db) = Scene(truth);
        var matches = GuidedMatcher.Match(da, db, ka, kb, truth, new GuidedMatchOptions());
        int right = matches.Count(m => m.IndexB == 2 * m.IndexA);
        Assert.True(right >= 295, $"{right} of 300 found");
        Assert.True(matches.Length - right <= 3, $"{matches.Length - right} wrong");
    }

    [Fact]
    public void Match_TransformOffByFarMoreThanTheWindow_FindsAlmostNothing()
    {
        var truth = Transform2D.Translation(37.5, -12.25);
        var (ka, da, kb, db) = Scene(truth);
        var matches = GuidedMatcher.Match(da, db, ka, kb, Transform2D.Translation(80, 40), new GuidedMatchOptions());
        Assert.True(matches.Count(m => m.IndexB == 2 * m.IndexA) == 0);
        // Unrelated random descriptors differ by about 128 bits, beyond MaxDistance.
        Assert.True(matches.Length <= 2, $"{matches.Length} matches");
    }

    [Fact]
    public void Match_SameInputs_SameOrderedResult()
    {
        var truth = Transform2D.Translation(5, 5);
        var (ka, da, kb, db) = Scene(truth);
        Assert.Equal(GuidedMatcher.Match(da, db, ka, kb, truth, new()), GuidedMatcher.Match(da, db, ka, kb, truth, new()));
    }
}
