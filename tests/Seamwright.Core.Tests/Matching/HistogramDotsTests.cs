using Seamwright.Core.Estimation;
using Seamwright.Core.Features.ScaleSpace;
using Seamwright.Core.Matching;

namespace Seamwright.Core.Tests.Matching;

public class HistogramDotsTests
{
    private const int Length = GradientHistogramDescriptor.Length;

    /// <summary>Descriptors near a few centres (equal and near-equal distances, so ties matter), some saturated at 255, at a few shared positions.</summary>
    private static ScaleSpaceFeatureSet Clustered(int n, ulong seed)
    {
        var r = new SplitMix64Stream(seed);
        var centres = Enumerable.Range(0, 4).Select(_ => Enumerable.Range(0, Length).Select(_ => (byte)(r.Next() % 256)).ToArray()).ToArray();
        var descriptors = new byte[n * Length];
        var keypoints = new ScaleSpaceKeypoint[n];
        for (int i = 0; i < n; i++)
        {
            var c = centres[(int)(r.Next() % 4)];
            for (int k = 0; k < Length; k++)
            {
                int v = c[k] + (r.Next() % 5 == 0 ? (int)(r.Next() % 7) - 3 : 0);
                descriptors[i * Length + k] = i % 9 == 0 ? (byte)255 : (byte)Math.Clamp(v, 0, 255);
            }
            // Every third point shares its position with the one before (one blob in two directions).
            float x = i % 3 == 2 ? keypoints[i - 1].X : (float)(r.Next() % 500), y = i % 3 == 2 ? keypoints[i - 1].Y : (float)(r.Next() % 400);
            keypoints[i] = new ScaleSpaceKeypoint(x, y, 2f, 0f, 1f);
        }
        return new ScaleSpaceFeatureSet(keypoints, descriptors);
    }

    [Theory]
    [InlineData(1, 2)]
    [InlineData(37, 41)]
    [InlineData(300, 257)]
    public void Row_VectorPath_EqualsScalarPathAndTheDefinition(int na, int nb)
    {
        var (a, _) = HistogramDots.Widen(Clustered(na, 5));
        var (b, _) = HistogramDots.Widen(Clustered(nb, 6));
        var best = new int[nb];
        var scalar = new int[nb];
        for (int i = 0; i < na; i++)
        {
            HistogramDots.Row(a, i, b, best);
            HistogramDots.Row(a, i, b, scalar, HistogramDots.Path.Scalar);
            Assert.Equal(scalar, best);
        }
        long direct = 0;
        for (int k = 0; k < Length; k++)
        {
            direct += a[(na - 1) * Length + k] * b[(nb - 1) * Length + k];
        }
        Assert.Equal(direct, scalar[nb - 1]);
    }

    [Fact]
    public void Row_AllSaturated_GivesTheLargestDotExactly()
    {
        var set = new ScaleSpaceFeatureSet([new ScaleSpaceKeypoint(0, 0, 1, 0, 1)], Enumerable.Repeat((byte)255, Length).ToArray());
        var (v, norms) = HistogramDots.Widen(set);
        var dots = new int[1];
        HistogramDots.Row(v, 0, v, dots);
        Assert.Equal(Length * 255 * 255, dots[0]);
        Assert.Equal(dots[0], norms[0]);
    }

    [Fact]
    public void Match_VectorPath_EqualsScalarPath()
    {
        var a = Clustered(400, 7);
        // B: the first 200 of A with a little noise and a shifted position (distinctive matches), then clustered ones.
        var extra = Clustered(150, 8);
        var r = new SplitMix64Stream(9);
        var descriptors = new byte[350 * Length];
        var keypoints = new ScaleSpaceKeypoint[350];
        for (int j = 0; j < 200; j++)
        {
            for (int k = 0; k < Length; k++)
            {
                descriptors[j * Length + k] = (byte)Math.Clamp(a.Descriptors[(2 * j) * Length + k] + (int)(r.Next() % 3) - 1, 0, 255);
            }
            keypoints[j] = a.Keypoints[2 * j] with { X = a.Keypoints[2 * j].X + 3 };
        }
        extra.Descriptors.CopyTo(descriptors, 200 * Length);
        extra.Keypoints.CopyTo(keypoints, 200);
        var b = new ScaleSpaceFeatureSet(keypoints, descriptors);
        var best = HistogramMatcher.Match(a, b, new MatchOptions(), HistogramDots.Path.Best);
        var scalar = HistogramMatcher.Match(a, b, new MatchOptions(), HistogramDots.Path.Scalar);
        Assert.NotEmpty(scalar.Matches);
        Assert.Equal(scalar.Matches, best.Matches);
        Assert.Equal(scalar.AmbiguousCount, best.AmbiguousCount);
    }
}
