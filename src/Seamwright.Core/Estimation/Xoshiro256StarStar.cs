namespace Seamwright.Core.Estimation;

/// <summary>
/// The project's pseudo-random generator: xoshiro256** (Blackman and Vigna, "Scrambled linear
/// pseudorandom number generators", ACM TOMS 2021), seeded through splitmix64 as its authors
/// recommend. Same seed, same sequence on every machine; never System.Random for results.
/// A mutable struct: pass it by ref.
/// </summary>
public struct Xoshiro256StarStar
{
    private ulong _s0, _s1, _s2, _s3;

    public Xoshiro256StarStar(ulong seed)
    {
        ulong sm = seed;
        _s0 = SplitMix64.Next(ref sm);
        _s1 = SplitMix64.Next(ref sm);
        _s2 = SplitMix64.Next(ref sm);
        _s3 = SplitMix64.Next(ref sm);
    }

    public ulong NextUInt64()
    {
        ulong result = ulong.RotateLeft(_s1 * 5, 7) * 9;
        ulong t = _s1 << 17;
        _s2 ^= _s0;
        _s3 ^= _s1;
        _s1 ^= _s2;
        _s0 ^= _s3;
        _s2 ^= t;
        _s3 = ulong.RotateLeft(_s3, 45);
        return result;
    }

    /// <summary>Uniform integer in [0, bound) without modulo bias (Lemire, ACM TOMACS 2019).</summary>
    public int NextInt(int bound)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(bound);
        ulong b = (ulong)bound;
        while (true)
        {
            ulong x = NextUInt64() >> 32;
            ulong m = x * b;
            ulong low = m & 0xFFFF_FFFFUL;
            if (low >= b || low >= ((0x1_0000_0000UL - b) % b))
            {
                return (int)(m >> 32);
            }
        }
    }

    /// <summary>Uniform double in [0, 1) from the top 53 bits.</summary>
    public double NextDouble() => (NextUInt64() >> 11) * (1.0 / (1UL << 53));
}

/// <summary>splitmix64 (Steele, Lea, Flood, OOPSLA 2014): seeding and seed mixing.</summary>
public static class SplitMix64
{
    public static ulong Next(ref ulong state)
    {
        state += 0x9E3779B97F4A7C15UL;
        return Mix(state);
    }

    /// <summary>The splitmix64 finaliser: a bijective 64-bit mix.</summary>
    public static ulong Mix(ulong z)
    {
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }
}
