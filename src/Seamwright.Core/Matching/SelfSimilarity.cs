using System.Numerics;
using Seamwright.Core.Features;

namespace Seamwright.Core.Matching;

/// <summary>
/// How repetitive an image is: the share of a spread sample of its features that have a
/// near-identical descriptor at another place in the same image. Periodic patterns (tiles,
/// grids, fabric) score high and make matches between images ambiguous; ordinary scenes score low.
/// </summary>
public static class SelfSimilarity
{
    /// <summary>Hamming distance (of 256) under which two descriptors count as twins (judgement: random pairs sit near 128).</summary>
    public const int TwinDistance = 32;

    public static double RepeatedFraction(ReadOnlySpan<Descriptor256> descriptors, ReadOnlySpan<Keypoint> keypoints, int sample = 400,
        double sameCornerRadius = 3.0)
    {
        int n = descriptors.Length;
        if (n < 2 || keypoints.Length != n)
        {
            return 0;
        }
        int count = Math.Min(sample, n);
        int repeated = 0;
        for (int s = 0; s < count; s++)
        {
            int i = (int)((long)s * n / count);
            var d = descriptors[i];
            var p = keypoints[i];
            for (int j = 0; j < n; j++)
            {
                if (j == i)
                {
                    continue;
                }
                var q = descriptors[j];
                int distance = BitOperations.PopCount(d.W0 ^ q.W0) + BitOperations.PopCount(d.W1 ^ q.W1)
                    + BitOperations.PopCount(d.W2 ^ q.W2) + BitOperations.PopCount(d.W3 ^ q.W3);
                if (distance > TwinDistance)
                {
                    continue;
                }
                var k = keypoints[j];
                double r = sameCornerRadius * Math.Max(p.Scale, k.Scale);
                if ((p.X - k.X) * (p.X - k.X) + (p.Y - k.Y) * (p.Y - k.Y) > r * r)
                {
                    repeated++;
                    break;
                }
            }
        }
        return (double)repeated / count;
    }
}
