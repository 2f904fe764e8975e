namespace Seamwright.Core.Estimation;

/// <summary>Draws minimal samples: distinct indices into the match list. Deterministic given its seed.</summary>
public interface ISampler
{
    /// <summary>Fills <paramref name="sample"/> (length = sample size) with distinct indices.</summary>
    void Draw(Span<int> sample);

    /// <summary>True once every draw is uniform over all matches (the standard bound then holds).</summary>
    bool IsUniform { get; }

    /// <summary>From now on draw uniformly over all matches.</summary>
    void SwitchToUniform();
}

/// <summary>How minimal samples are drawn.</summary>
public enum SamplerKind
{
    /// <summary>PROSAC: the best-ranked matches first (Chum and Matas, CVPR 2005). Needs best-first input.</summary>
    Prosac,
    /// <summary>Uniform over all matches (Fischler and Bolles, CACM 1981).</summary>
    Uniform,
}

/// <summary>Uniform sampling without replacement from [0, count).</summary>
public struct UniformSampler : ISampler
{
    private Xoshiro256StarStar _rng;
    private readonly int _count;

    public UniformSampler(ulong seed, int count)
    {
        _rng = new Xoshiro256StarStar(seed);
        _count = count;
    }

    public void Draw(Span<int> sample) => DrawDistinct(ref _rng, _count, sample);

    public readonly bool IsUniform => true;

    public readonly void SwitchToUniform()
    {
    }

    /// <summary>Distinct uniform indices from [0, count) by rejection (samples are tiny).</summary>
    internal static void DrawDistinct(ref Xoshiro256StarStar rng, int count, Span<int> sample)
    {
        if (count < sample.Length)
        {
            throw new ArgumentOutOfRangeException(nameof(count), "Fewer items than the sample size.");
        }
        for (int i = 0; i < sample.Length; i++)
        {
            int k;
            do
            {
                k = rng.NextInt(count);
            }
            while (sample[..i].Contains(k));
            sample[i] = k;
        }
    }
}
