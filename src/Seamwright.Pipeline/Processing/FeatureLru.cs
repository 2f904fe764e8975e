using Seamwright.Pipeline.Analysis;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// The features of the images a set's pairs need, held in memory up to a budget in bytes (least
/// recently used dropped first) and read back from the feature cache on a miss, so a set's
/// memory does not grow with its number of images. An entry's size is its cache entry's length
/// (the encoded features: keypoints, descriptors and patches), a close measure of what the
/// decoded object holds. One entry larger than the whole budget is still returned (not kept).
/// Thread-safe; two threads missing the same image both read it (same bytes, same result).
/// </summary>
public sealed class FeatureLru(long budgetBytes, Func<string, (ImageAnalysis Analysis, long Bytes)> load)
{
    private readonly object _gate = new();
    private readonly Dictionary<string, LinkedListNode<Entry>> _index = new(StringComparer.Ordinal);
    private readonly LinkedList<Entry> _order = new();
    private long _held;

    private sealed record Entry(string Key, ImageAnalysis Analysis, long Bytes);

    public long HeldBytes { get { lock (_gate) { return _held; } } }

    public int Loads { get; private set; }

    public ImageAnalysis Get(string key)
    {
        lock (_gate)
        {
            if (_index.TryGetValue(key, out var node))
            {
                _order.Remove(node);
                _order.AddFirst(node);
                return node.Value.Analysis;
            }
        }
        var (analysis, bytes) = load(key);
        lock (_gate)
        {
            Loads++;
            if (_index.ContainsKey(key) || bytes > budgetBytes)
            {
                return analysis;
            }
            while (_held + bytes > budgetBytes && _order.Last is { } last)
            {
                _order.RemoveLast();
                _index.Remove(last.Value.Key);
                _held -= last.Value.Bytes;
            }
            _index[key] = _order.AddFirst(new Entry(key, analysis, bytes));
            _held += bytes;
            return analysis;
        }
    }
}
