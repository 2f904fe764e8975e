using System.Globalization;
using Seamwright.Pipeline.Processing;

namespace Seamwright.Host.Operations;

/// <summary>
/// Retention over the service's output roots: each root's ledger gives run start times and drops
/// the rows of superseded runs; each root's confidence log is rewritten under its own append lock.
/// Outputs live in one folder per set and are replaced in place by every run (files the newest
/// manifest no longer lists are removed by that run), so pruning never touches a set folder:
/// only ledger rows of superseded runs go. Run ids are per root; <see cref="RunStartedAt"/>
/// answers for the root whose confidence log is being rewritten.
/// </summary>
internal sealed class LedgerRunRetention(IReadOnlyList<ProcessingContext> roots) : IRunRetention
{
    private ProcessingContext? _current;

    public IReadOnlyList<string> PruneOldRuns(int keepOld)
    {
        var notes = new List<string>();
        foreach (var root in roots)
        {
            foreach (var (setId, runs) in root.Store.PruneRuns(keepOld))
            {
                notes.Add(string.Create(CultureInfo.InvariantCulture,
                    $"removed the ledger rows of {runs.Count} superseded runs of set {setId} in {root.OutputRoot}"));
            }
        }
        return notes;
    }

    public DateTimeOffset? RunStartedAt(long run)
    {
        var root = Volatile.Read(ref _current) ?? (roots.Count == 1 ? roots[0] : null);
        return root?.Store.RunStartedUtc(run) is { } t ? new DateTimeOffset(t, TimeSpan.Zero) : null;
    }

    public void WithConfidenceLogLocked(string path, Action rewrite)
    {
        ArgumentNullException.ThrowIfNull(rewrite);
        string full = Path.GetFullPath(path);
        var root = roots.FirstOrDefault(r => string.Equals(Path.GetFullPath(r.Log.Path), full, StringComparison.Ordinal))
            ?? throw new ArgumentException("Not the confidence log of a served output root: " + path, nameof(path));
        root.Log.WithAppendsHeld(() =>
        {
            Volatile.Write(ref _current, root);
            try
            {
                rewrite();
            }
            finally
            {
                Volatile.Write(ref _current, null);
            }
        });
    }

    /// <summary>The confidence logs of the roots (one per output root).</summary>
    public IReadOnlyList<string> ConfidenceLogs => roots.Select(r => r.Log.Path).ToList();
}
