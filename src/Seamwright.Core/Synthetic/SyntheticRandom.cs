using Seamwright.Core.Estimation;

namespace Seamwright.Core.Synthetic;

/// <summary>
/// Randomness for the synthetic-image generators: the project's PRNG
/// (<see cref="Xoshiro256StarStar"/>, seeded through splitmix64) plus normal draws, so test
/// images and the demo never depend on System.Random.
/// </summary>
internal sealed class SyntheticRandom(ulong seed)
{
    private Xoshiro256StarStar _core = new(seed);

    /// <summary>The splitmix64 finaliser: a stateless 64-bit mixing function.</summary>
    public static ulong Mix(ulong z) => SplitMix64.Mix(z);

    public ulong NextUInt64() => _core.NextUInt64();

    /// <summary>Uniform in [0, 1) with 53 random bits.</summary>
    public double NextDouble() => _core.NextDouble();

    /// <summary>Standard normal by the Marsaglia polar method (no trigonometry).</summary>
    public double NextGaussian()
    {
        while (true)
        {
            double u = 2 * NextDouble() - 1;
            double v = 2 * NextDouble() - 1;
            double s = u * u + v * v;
            if (s > 0 && s < 1)
            {
                return u * Math.Sqrt(-2 * Math.Log(s) / s);
            }
        }
    }
}
