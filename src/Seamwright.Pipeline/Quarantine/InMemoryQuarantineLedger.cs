namespace Seamwright.Pipeline.Quarantine;

/// <summary>A ledger that lives as long as the process: for one-shot runs and tests.</summary>
public sealed class InMemoryQuarantineLedger : IQuarantineLedger
{
    private readonly Dictionary<string, Entry> _byPath = new(StringComparer.Ordinal);

    private sealed class Entry(FileIdentity file)
    {
        public FileIdentity File { get; } = file;
        public int Strikes { get; set; }
        public string? Reason { get; set; }
        public DateTimeOffset? InProgressSince { get; set; }
        public DateTimeOffset? QuarantinedAt { get; set; }
    }

    public QuarantineEntry? FindQuarantined(FileIdentity file)
    {
        lock (_byPath)
        {
            var e = Current(file, create: false);
            return e?.QuarantinedAt is { } at ? new QuarantineEntry(e.File, e.Strikes, e.Reason ?? "", at) : null;
        }
    }

    public void MarkInProgress(FileIdentity file, DateTimeOffset at)
    {
        lock (_byPath)
        {
            Current(file, create: true)!.InProgressSince = at;
        }
    }

    public void ClearInProgress(FileIdentity file)
    {
        lock (_byPath)
        {
            if (Current(file, create: false) is { } e)
            {
                e.InProgressSince = null;
            }
        }
    }

    public int AddStrike(FileIdentity file, string reason, DateTimeOffset at)
    {
        lock (_byPath)
        {
            var e = Current(file, create: true)!;
            e.Strikes++;
            e.Reason = reason;
            return e.Strikes;
        }
    }

    public void Quarantine(FileIdentity file, string reason, DateTimeOffset at)
    {
        lock (_byPath)
        {
            var e = Current(file, create: true)!;
            e.Reason = reason;
            e.QuarantinedAt = at;
        }
    }

    public IReadOnlyList<QuarantineEntry> ListQuarantined()
    {
        lock (_byPath)
        {
            return _byPath.Values
                .Where(e => e.QuarantinedAt is not null)
                .OrderBy(e => e.File.Path, StringComparer.Ordinal)
                .Select(e => new QuarantineEntry(e.File, e.Strikes, e.Reason ?? "", e.QuarantinedAt!.Value))
                .ToList();
        }
    }

    public IReadOnlyList<FileIdentity> TakeInterrupted()
    {
        lock (_byPath)
        {
            var left = _byPath.Values.Where(e => e.InProgressSince is not null).ToList();
            left.ForEach(e => e.InProgressSince = null);
            return left.Select(e => e.File).ToList();
        }
    }

    private Entry? Current(FileIdentity file, bool create)
    {
        if (_byPath.TryGetValue(file.Path, out var e) && e.File.SameContentAs(file))
        {
            return e;
        }
        if (e is not null)
        {
            _byPath.Remove(file.Path);
        }
        if (!create)
        {
            return null;
        }
        e = new Entry(file);
        _byPath[file.Path] = e;
        return e;
    }
}
