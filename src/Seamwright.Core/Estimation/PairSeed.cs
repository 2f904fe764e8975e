using System.Text;

namespace Seamwright.Core.Estimation;

/// <summary>
/// The seed of one pair's estimate: a function of the run's base seed and a stable hash of the
/// pair's two identifiers (ordinal, not culture- or process-dependent like string.GetHashCode),
/// so adding or reordering other pairs never changes a pair's result.
/// </summary>
public static class PairSeed
{
    /// <summary>64-bit FNV-1a over the UTF-8 bytes of both identifiers with a separator.</summary>
    public static ulong StableHash(string first, string second)
    {
        ArgumentNullException.ThrowIfNull(first);
        ArgumentNullException.ThrowIfNull(second);
        ulong h = 0xCBF29CE484222325UL;
        foreach (byte b in Encoding.UTF8.GetBytes(first + "\u0000" + second))
        {
            h ^= b;
            h *= 0x100000001B3UL;
        }
        return h;
    }

    /// <summary>The pair seed: splitmix64 mix of the base seed combined with the pair hash (order matters).</summary>
    public static ulong Derive(ulong baseSeed, string first, string second) =>
        SplitMix64.Mix(SplitMix64.Mix(baseSeed) ^ StableHash(first, second));
}
