namespace Seamwright.Core.Features;

/// <summary>
/// The splitmix64 generator (Steele, Lea, Flood, OOPSLA 2014): small, seeded and identical on
/// every platform. Used here only to generate the descriptor pattern offline.
/// </summary>
internal struct SplitMix64(ulong seed)
{
    private ulong _state = seed;

    public ulong Next()
    {
        ulong z = _state += 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }

    /// <summary>Uniform integer in [0, n).</summary>
    public int NextInt(int n) => (int)((Next() >> 33) % (ulong)n);

    /// <summary>Uniform double in [0, 1) from 53 bits.</summary>
    public double NextDouble() => (Next() >> 11) * (1.0 / (1UL << 53));
}
