using System.Numerics;
using System.Runtime.InteropServices;

namespace Seamwright.Core.Features;

/// <summary>A 256-bit binary descriptor as four 64-bit words (bit i of the pattern is bit i%64 of word i/64).</summary>
[StructLayout(LayoutKind.Sequential)]
public readonly record struct Descriptor256(ulong W0, ulong W1, ulong W2, ulong W3)
{
    public const int Bits = 256;

    /// <summary>Number of differing bits.</summary>
    public static int Hamming(in Descriptor256 a, in Descriptor256 b) =>
        BitOperations.PopCount(a.W0 ^ b.W0) + BitOperations.PopCount(a.W1 ^ b.W1)
        + BitOperations.PopCount(a.W2 ^ b.W2) + BitOperations.PopCount(a.W3 ^ b.W3);

    public bool Bit(int i) => i switch
    {
        < 64 => ((W0 >> i) & 1) != 0,
        < 128 => ((W1 >> (i - 64)) & 1) != 0,
        < 192 => ((W2 >> (i - 128)) & 1) != 0,
        _ => ((W3 >> (i - 192)) & 1) != 0,
    };
}
