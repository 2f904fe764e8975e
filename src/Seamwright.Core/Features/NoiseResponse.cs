using Seamwright.Core.Estimation;
using System.Collections.Concurrent;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Features;

/// <summary>
/// What pure noise does to the corner response on each pyramid level. Area averaging by a
/// non-integer factor correlates neighbouring pixels, so a noise estimate made on a coarse level
/// misjudges the gradients there; instead white noise of known deviation is pushed through the
/// same pyramid once per detector setting, and the mean smaller eigenvalue per level (which scales
/// with the noise variance) is kept.
/// </summary>
internal static class NoiseResponse
{
    private const double SimulatedSigma = 20;
    private const int SimulatedSide = 384;
    private static readonly ConcurrentDictionary<(double, int, int), double[]> Cache = new();

    /// <summary>Mean smaller tensor eigenvalue per level for white noise of unit deviation at level 0.</summary>
    public static double[] PerUnitVariance(CornerDetectorOptions options) =>
        Cache.GetOrAdd((options.ScaleFactor, options.BlockSize, options.Levels), static key => Simulate(key.Item1, key.Item2, key.Item3));

    private static double[] Simulate(double scaleFactor, int blockSize, int levels)
    {
        var rng = new SplitMix64Stream(0x4E01_5E00_0000_0001UL);
        var image = new GrayImage(SimulatedSide, SimulatedSide);
        for (int i = 0; i < image.Pixels.Length; i++)
        {
            double u1 = (rng.NextDouble() + 1e-12), u2 = rng.NextDouble();
            double g = Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
            image.Pixels[i] = (byte)Math.Clamp((int)Math.Round(128 + SimulatedSigma * g), 0, 255);
        }
        var result = new double[levels];
        var level = image;
        for (int k = 0; k < levels; k++)
        {
            if (k > 0)
            {
                if (AreaResampler.OutputLength(level.Width, scaleFactor) < 4 * blockSize)
                {
                    result[k] = result[k - 1];
                    continue;
                }
                level = AreaResampler.Downscale(level, scaleFactor).Image;
            }
            int w = level.Width, h = level.Height;
            var minEigen = new float[w * h];
            CornerResponse.Compute(level.Pixels, w, h, blockSize, 0, Span<float>.Empty, minEigen);
            double sum = 0;
            int n = 0;
            for (int y = blockSize; y < h - blockSize; y++)
            {
                for (int x = blockSize; x < w - blockSize; x++)
                {
                    sum += minEigen[y * w + x];
                    n++;
                }
            }
            result[k] = sum / n / (SimulatedSigma * SimulatedSigma);
        }
        return result;
    }
}
