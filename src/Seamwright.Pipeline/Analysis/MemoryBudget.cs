namespace Seamwright.Pipeline.Analysis;

/// <summary>
/// One budget of decoded-pixel memory shared by every decode of the process. A decode reserves
/// its estimated size before it starts and releases it when done; a single decode larger than
/// the whole budget is allowed alone (it waits until nothing else holds memory).
/// </summary>
public sealed class MemoryBudget
{
    private readonly object _gate = new();
    private long _used;

    public MemoryBudget(long bytes)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(bytes, 1);
        Capacity = bytes;
    }

    public long Capacity { get; }

    public long Used
    {
        get { lock (_gate) { return _used; } }
    }

    public Reservation Reserve(long bytes, CancellationToken cancel)
    {
        long want = Math.Max(1, bytes);
        lock (_gate)
        {
            while (_used > 0 && _used + want > Capacity)
            {
                cancel.ThrowIfCancellationRequested();
                Monitor.Wait(_gate, 100);
            }
            _used += want;
        }
        return new Reservation(this, want);
    }

    private void Release(long bytes)
    {
        lock (_gate)
        {
            _used -= bytes;
            Monitor.PulseAll(_gate);
        }
    }

    public readonly struct Reservation(MemoryBudget owner, long bytes) : IDisposable
    {
        public void Dispose() => owner?.Release(bytes);
    }
}
