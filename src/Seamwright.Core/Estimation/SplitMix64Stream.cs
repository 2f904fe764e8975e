namespace Seamwright.Core.Estimation;

/// <summary>
/// A splitmix64 sequence as a value (Steele, Lea, Flood, OOPSLA 2014): the same numbers as
/// <see cref="SplitMix64.Next(ref ulong)"/> from the same seed. Used where a small seeded stream
/// is enough (the descriptor pattern's offline generation, the noise-floor simulation, tests).
/// </summary>
internal struct SplitMix64Stream(ulong seed)
{
    private ulong _state = seed;

    public ulong Next() => SplitMix64.Next(ref _state);

    /// <summary>Uniform integer in [0, n).</summary>
    public int NextInt(int n) => (int)((Next() >> 33) % (ulong)n);

    /// <summary>Uniform double in [0, 1) from 53 bits.</summary>
    public double NextDouble() => (Next() >> 11) * (1.0 / (1UL << 53));
}
