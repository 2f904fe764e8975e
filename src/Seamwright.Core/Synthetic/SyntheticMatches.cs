using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Synthetic;

/// <summary>A generated match set with its ground truth.</summary>
/// <param name="Matches">Matches in random order (no quality ranking).</param>
/// <param name="IsInlier">Per match: generated from the true transform (true) or at random (false).</param>
/// <param name="Truth">The transform the inliers follow (first image to second).</param>
public sealed record SyntheticMatchSet(Correspondence[] Matches, bool[] IsInlier, Transform2D Truth, ImageSize SizeA, ImageSize SizeB)
{
    public int InlierCount => IsInlier.Count(x => x);
}

/// <summary>
/// Seeded generator of tentative matches with known ground truth, for tests, the demo and
/// benchmarks. Inliers: a point uniform over the first image whose true image lies inside the
/// second, plus Gaussian noise on the second point with the given root mean square length
/// (sigma = rms / sqrt 2 per coordinate). Outliers: independent uniform points in both images.
/// </summary>
public static class SyntheticMatches
{
    public static SyntheticMatchSet Generate(Transform2D truth, ImageSize sizeA, ImageSize sizeB, int count, double outlierRatio, double noiseRmsPx, ulong seed)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(count);
        if (!(outlierRatio is >= 0 and <= 1) || !(noiseRmsPx >= 0))
        {
            throw new ArgumentException("Outlier ratio must lie in [0, 1] and noise must not be negative.");
        }
        var rng = new Xoshiro256StarStar(seed);
        int inliers = (int)Math.Round(count * (1 - outlierRatio));
        double sigma = noiseRmsPx / Math.Sqrt(2);
        var matches = new Correspondence[count];
        var isInlier = new bool[count];
        for (int i = 0; i < count; i++)
        {
            if (i < inliers)
            {
                for (int attempt = 0; ; attempt++)
                {
                    double x = rng.NextDouble() * (sizeA.Width - 1), y = rng.NextDouble() * (sizeA.Height - 1);
                    if (!truth.TryApply(x, y, out double u, out double v) || truth.W(x, y) <= 0 || u < 0 || v < 0 || u > sizeB.Width - 1 || v > sizeB.Height - 1)
                    {
                        if (attempt > 100_000)
                        {
                            throw new ArgumentException("The true transform maps almost nothing of the first image into the second.");
                        }
                        continue;
                    }
                    matches[i] = new Correspondence(x, y, u + sigma * Gaussian(ref rng), v + sigma * Gaussian(ref rng));
                    isInlier[i] = true;
                    break;
                }
            }
            else
            {
                matches[i] = new Correspondence(
                    rng.NextDouble() * (sizeA.Width - 1), rng.NextDouble() * (sizeA.Height - 1),
                    rng.NextDouble() * (sizeB.Width - 1), rng.NextDouble() * (sizeB.Height - 1));
            }
        }
        // Fisher-Yates shuffle so inliers carry no rank advantage.
        for (int i = count - 1; i > 0; i--)
        {
            int j = rng.NextInt(i + 1);
            (matches[i], matches[j]) = (matches[j], matches[i]);
            (isInlier[i], isInlier[j]) = (isInlier[j], isInlier[i]);
        }
        return new SyntheticMatchSet(matches, isInlier, truth, sizeA, sizeB);
    }

    /// <summary>Standard normal variate (Box-Muller; one of the pair is discarded for simplicity).</summary>
    private static double Gaussian(ref Xoshiro256StarStar rng)
    {
        double u1 = 1.0 - rng.NextDouble();
        double u2 = rng.NextDouble();
        return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
