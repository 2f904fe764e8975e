namespace Seamwright.Core.Estimation;

/// <summary>
/// PROSAC progressive sampling (Chum and Matas, "Matching with PROSAC - progressive sample
/// consensus", CVPR 2005, section 2.2 and Algorithm 1). Matches must come best-first. Sample t
/// is drawn from the top n matches, where n grows on the schedule T'_n; each sample in
/// (T'_(n-1), T'_n] holds match n and s - 1 others from the top n - 1. Once every match is in
/// play (t beyond T'_N) it draws uniformly, i.e. it turns into plain RANSAC sampling.
/// </summary>
public struct ProsacSampler : ISampler
{
    /// <summary>
    /// T_N, the number of samples after which PROSAC would have drawn as RANSAC does; 200000 as in
    /// the paper's experiments (from memory).
    /// </summary>
    public const int DefaultGrowthHorizon = 200_000;

    private Xoshiro256StarStar _rng;
    private readonly int _count;
    private readonly int _size;
    private int _n;           // current top-n subset size
    private long _t;          // samples drawn so far
    private double _tn;       // T_n (real-valued)
    private long _tnPrime;    // T'_n (integer schedule)
    private bool _uniform;    // switched to uniform draws by the loop

    public ProsacSampler(ulong seed, int count, int sampleSize, int growthHorizon = DefaultGrowthHorizon)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(count, sampleSize);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(sampleSize);
        _rng = new Xoshiro256StarStar(seed);
        _count = count;
        _size = sampleSize;
        _n = sampleSize;
        _t = 0;
        // T_m = T_N * prod_{i=0}^{m-1} (m - i) / (N - i)
        double tn = growthHorizon;
        for (int i = 0; i < sampleSize; i++)
        {
            tn *= (double)(sampleSize - i) / (count - i);
        }
        _tn = tn;
        _tnPrime = 1;
    }

    /// <summary>The size of the top-ranked subset the last sample came from.</summary>
    public readonly int SubsetSize => _n;

    public readonly bool IsUniform => _uniform || (_n == _count && _t > _tnPrime);

    public void SwitchToUniform() => _uniform = true;

    public void Draw(Span<int> sample)
    {
        if (sample.Length != _size)
        {
            throw new ArgumentException("Sample span length differs from the sample size.", nameof(sample));
        }
        _t++;
        if (_uniform)
        {
            UniformSampler.DrawDistinct(ref _rng, _count, sample);
            return;
        }
        while (_n < _count && _t > _tnPrime)
        {
            // T_(n+1) = T_n (n + 1) / (n + 1 - m); T'_(n+1) = T'_n + ceil(T_(n+1) - T_n)
            double next = _tn * (_n + 1) / (_n + 1 - _size);
            _tnPrime += (long)Math.Ceiling(next - _tn);
            _tn = next;
            _n++;
        }
        if (_t > _tnPrime)
        {
            UniformSampler.DrawDistinct(ref _rng, _count, sample);
            return;
        }
        // Match n (index n - 1) plus s - 1 distinct matches from the top n - 1.
        sample[0] = _n - 1;
        if (_size > 1)
        {
            UniformSampler.DrawDistinct(ref _rng, _n - 1, sample[1..]);
        }
    }
}
