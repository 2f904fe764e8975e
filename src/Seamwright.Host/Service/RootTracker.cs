using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Host.Service;

/// <summary>Where a tracked set stands in the service.</summary>
internal enum SetPhase
{
    Waiting,
    Queued,
    Running,
    Done,
    Failed,
}

/// <summary>A file of a tracked set with the stability gate's clock.</summary>
internal sealed class TrackedFile(InputFile file, DateTime stableSinceUtc)
{
    public InputFile File { get; set; } = file;

    /// <summary>Since when size and time have been unchanged across looks.</summary>
    public DateTime StableSinceUtc { get; set; } = stableSinceUtc;
}

internal sealed class TrackedSet(string id, DateTime nowUtc)
{
    public string Id { get; } = id;
    public Dictionary<string, TrackedFile> Files { get; } = new(StringComparer.Ordinal);
    public DateTime FirstSeenUtc { get; set; } = nowUtc;
    public DateTime LastChangeUtc { get; set; } = nowUtc;
    /// <summary>
    /// What started the pending run: the set's last change, a settings reload or the service
    /// start that found it out of date. Arrival-to-output counts from here, not from the images'
    /// first arrival.
    /// </summary>
    public DateTime TriggerUtc { get; set; } = nowUtc;
    public SetPhase Phase { get; set; } = SetPhase.Waiting;
    /// <summary>An input changed while the set was queued or running: look again when it returns.</summary>
    public bool ChangedWhileBusy { get; set; }
    public string LastWhy { get; set; } = "";
    /// <summary>A deferred set (claimed by another node, or the shared ledger unreachable) is not taken again before this.</summary>
    public DateTime RetryAfterUtc { get; set; } = DateTime.MinValue;
}

/// <summary>
/// One root as the scheduler sees it: the file polling (catalog scans, hints, looks at files in
/// the stability gate) and the ledger writes around the pure decisions of <see cref="SetLifecycle"/>.
/// The ledger is the durable truth; this is rebuilt from a full scan at start.
/// </summary>
internal sealed class RootTracker : ISetFacts
{
    private readonly SetLifecycle _life;

    public RootTracker(int index, RootSession session)
    {
        Index = index;
        Session = session;
        _life = new SetLifecycle(this);
    }

    public int Index { get; }

    public RootSession Session { get; }

    public IReadOnlyDictionary<string, TrackedSet> Sets => _life.Sets;

    /// <summary>
    /// Rebuilds from a full scan at start: sets already up to date are done, the rest wait (through
    /// the stability gate); sets the ledger holds whose folders went while the service was stopped
    /// are retired. Returns the ids retired.
    /// </summary>
    public List<string> Start(DateTime now, double stableSeconds)
    {
        foreach (var s in Session.Catalog.Discover())
        {
            bool upToDate = Session.Context.IsUpToDate(s);
            _life.Found(s, upToDate, !upToDate && Session.Context.Store.GetSet(s.SetId)?.DoneRun is not null, now, stableSeconds);
            Write();
        }
        return Session.ServedThisRootBefore ? SetRetirement.RetireMissing(Session.Context, [.. _life.Sets.Keys]) : [];
    }

    /// <summary>
    /// Retires the sets left without any input file (their folder removed) for at least
    /// <paramref name="graceSeconds"/>, unless a run of theirs is queued or running (it is
    /// abandoned as changed, and the set retired after it). A set the ledger never recorded is
    /// only forgotten. Returns the ids retired; a set folder that comes back is a new set.
    /// </summary>
    public List<string> RetireEmptied(DateTime now, double graceSeconds)
    {
        var retired = new List<string>();
        foreach (var id in _life.Emptied(now, graceSeconds))
        {
            if (Session.Context.Store.GetSet(id) is { State: not SetStates.Retired })
            {
                SetRetirement.Retire(Session.Context, id);
                retired.Add(id);
            }
            _life.Forget(id);
        }
        return retired;
    }

    /// <summary>
    /// Applies a full rescan: every set's file list is reconciled with what is on disk now.
    /// Returns the full paths of files the rescan found added or changed (the watcher should
    /// have reported them).
    /// </summary>
    public List<string> Rescan(DateTime now)
    {
        var found = Session.Catalog.Discover().ToDictionary(s => s.SetId, s => s.Files, StringComparer.Ordinal);
        var changed = _life.Reconcile(found, now);
        Write();
        return changed;
    }

    /// <summary>Applies one hinted path. Returns false when the path needs a full rescan (a folder, or not classifiable).</summary>
    public bool ApplyHint(string path, DateTime now)
    {
        var where = Session.Catalog.Classify(path);
        if (where is null)
        {
            // A folder created, renamed or removed, or a non-image file: only a rescan tells what it means.
            return Session.Catalog.IsExcluded(path) || (File.Exists(path) && !Directory.Exists(path));
        }
        var (setId, key) = where.Value;
        var info = new FileInfo(path);
        _life.Observed(setId, key, info.Exists
            ? new InputFile(info.FullName, Session.Catalog.RootRelative(info.FullName), key, info.Length, info.LastWriteTimeUtc.Ticks)
            : null, now);
        Write();
        return true;
    }

    /// <summary>Looks again at files not yet past the stability gate (size and time unchanged across looks).</summary>
    public void Relook(DateTime now, double stableSeconds)
    {
        foreach (var (setId, file) in _life.InGate(now, stableSeconds))
        {
            var info = new FileInfo(file.FullPath);
            _life.Observed(setId, file.Key, info.Exists ? file with { Size = info.Length, MtimeTicks = info.LastWriteTimeUtc.Ticks } : null, now);
        }
        Write();
    }

    /// <summary>After a settings reload: done sets whose fingerprint changed become stale and wait.</summary>
    public int ApplySettingsChange(DateTime now)
    {
        int n = _life.SettingsChanged(now);
        Write();
        return n;
    }

    /// <summary>Sets that are complete now, as jobs (their stable files only when overdue).</summary>
    public List<SetJob> Ready(DateTime now, double stableSeconds)
    {
        var jobs = _life.Ready(Index, now, stableSeconds);
        Write();
        return jobs;
    }

    public void Queued(string setId) => _life.Queued(setId);

    public void Running(string setId) => _life.Running(setId);

    public void Finished(SetJob job, SetOutcome outcome, DateTime now)
    {
        _life.Finished(job, outcome, now);
        Write();
    }

    /// <summary>Makes the ledger writes the lifecycle decided.</summary>
    private void Write()
    {
        foreach (var note in _life.TakeNotes())
        {
            Session.Context.Store.SetState(note.SetId, note.State, note.Profile, note.Reason);
        }
    }

    string ISetFacts.ProfileFor(string setId) => Session.Catalog.ProfileFor(setId);

    CompletionSettings ISetFacts.CompletionFor(string profile) => Session.Context.Options.Profile(profile).Completion;

    bool ISetFacts.HasReadyMarker(string setId, string marker) =>
        Session.Catalog.MarkerFolder(setId) is { } folder && File.Exists(Path.Combine(folder, marker));

    SetInputs ISetFacts.Build(string setId, IEnumerable<InputFile> files) => Session.Catalog.Build(setId, files);

    bool ISetFacts.IsUpToDate(SetInputs inputs) => Session.Context.IsUpToDate(inputs);
}
