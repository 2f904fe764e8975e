namespace Seamwright.Pipeline.Analysis;

/// <summary>
/// A pair's seed from the base seed and a stable hash of the two image names (FNV-1a 64 over
/// UTF-8, mixed by the splitmix64 finaliser), so a pair keeps its seed whatever else is in the set.
/// </summary>
public static class PairSeed
{
    public static ulong Derive(ulong baseSeed, string imageA, string imageB)
    {
        ArgumentNullException.ThrowIfNull(imageA);
        ArgumentNullException.ThrowIfNull(imageB);
        ulong h = 14695981039346656037UL;
        foreach (byte b in System.Text.Encoding.UTF8.GetBytes(imageA + "\0" + imageB))
        {
            h = (h ^ b) * 1099511628211UL;
        }
        ulong z = baseSeed + 0x9E3779B97F4A7C15UL * (h | 1);
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }
}
