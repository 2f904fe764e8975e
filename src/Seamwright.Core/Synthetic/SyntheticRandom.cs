namespace Seamwright.Core.Synthetic;

/// <summary>
/// xoshiro256** (Blackman and Vigna, "Scrambled linear pseudorandom number generators",
/// ACM TOMS 2021) seeded through splitmix64, private to the synthetic-image generators so that
/// test images never depend on System.Random. The project's estimation PRNG lives elsewhere.
/// </summary>
internal sealed class SyntheticRandom
{
    private ulong _s0;
    private ulong _s1;
    private ulong _s2;
    private ulong _s3;

    public SyntheticRandom(ulong seed)
    {
        ulong x = seed;
        _s0 = SplitMix64(ref x);
        _s1 = SplitMix64(ref x);
        _s2 = SplitMix64(ref x);
        _s3 = SplitMix64(ref x);
    }

    private SyntheticRandom(ulong s0, ulong s1, ulong s2, ulong s3)
    {
        _s0 = s0;
        _s1 = s1;
        _s2 = s2;
        _s3 = s3;
    }

    /// <summary>A generator with the given raw state (for checks against reference vectors).</summary>
    internal static SyntheticRandom FromState(ulong s0, ulong s1, ulong s2, ulong s3) => new(s0, s1, s2, s3);

    public static ulong SplitMix64(ref ulong state)
    {
        state += 0x9E3779B97F4A7C15UL;
        return Mix(state);
    }

    /// <summary>The splitmix64 finaliser: a stateless 64-bit mixing function.</summary>
    public static ulong Mix(ulong z)
    {
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }

    public ulong NextUInt64()
    {
        ulong result = RotateLeft(_s1 * 5, 7) * 9;
        ulong t = _s1 << 17;
        _s2 ^= _s0;
        _s3 ^= _s1;
        _s1 ^= _s2;
        _s0 ^= _s3;
        _s2 ^= t;
        _s3 = RotateLeft(_s3, 45);
        return result;
    }

    /// <summary>Uniform in [0, 1) with 53 random bits.</summary>
    public double NextDouble() => (NextUInt64() >> 11) * (1.0 / (1UL << 53));

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

    private static ulong RotateLeft(ulong x, int k) => (x << k) | (x >> (64 - k));
}
