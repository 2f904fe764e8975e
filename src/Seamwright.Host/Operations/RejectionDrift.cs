namespace Seamwright.Host.Operations;

/// <summary>
/// Warns when the share of rejected pairs in the recent window rises above its norm (the rate
/// over the longer history before that window). Above means beyond both an absolute margin and
/// three binomial standard errors of the recent rate, so small samples do not warn (the 3-sigma
/// rule is common practice for control charts). Pure and deterministic; not thread-safe.
/// </summary>
internal sealed class RejectionDrift(int recentWindow = 200, int historyWindow = 2000, double minimumRise = 0.10)
{
    private readonly Queue<bool> _recent = new();
    private readonly Queue<bool> _history = new();
    private int _recentRejected;
    private int _historyRejected;

    /// <summary>Adds one pair result (true = rejected).</summary>
    public void Add(bool rejected)
    {
        _recent.Enqueue(rejected);
        _recentRejected += rejected ? 1 : 0;
        if (_recent.Count > recentWindow)
        {
            bool old = _recent.Dequeue();
            _recentRejected -= old ? 1 : 0;
            _history.Enqueue(old);
            _historyRejected += old ? 1 : 0;
            if (_history.Count > historyWindow)
            {
                _historyRejected -= _history.Dequeue() ? 1 : 0;
            }
        }
    }

    public double? RecentRate => _recent.Count == 0 ? null : (double)_recentRejected / _recent.Count;

    public double? NormRate => _history.Count == 0 ? null : (double)_historyRejected / _history.Count;

    /// <summary>A warning in words when the recent rate drifted above the norm; null otherwise.</summary>
    public string? Check()
    {
        // Judge only a full recent window against a history at least as long.
        if (_recent.Count < recentWindow || _history.Count < recentWindow)
        {
            return null;
        }
        double recent = RecentRate!.Value, norm = NormRate!.Value;
        double sigma = Math.Sqrt(Math.Max(norm * (1 - norm), 1e-4) / _recent.Count);
        double threshold = norm + Math.Max(minimumRise, 3 * sigma);
        return recent > threshold
            ? string.Create(System.Globalization.CultureInfo.InvariantCulture,
                $"rejection rate {100 * recent:0}% over the last {_recent.Count} pairs is above its norm of {100 * norm:0}% (over the {_history.Count} pairs before; warn above {100 * threshold:0}%)")
            : null;
    }
}
