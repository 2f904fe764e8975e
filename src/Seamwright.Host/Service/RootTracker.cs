using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Sets;
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
/// The scheduler's view of one root: every set with its files, the stability gate, completion,
/// and the lifecycle (a done set whose inputs change becomes stale and waits again). The ledger
/// is the durable truth; this is rebuilt from a full scan at start.
/// </summary>
internal sealed class RootTracker(int index, RootSession session)
{
    private readonly Dictionary<string, TrackedSet> _sets = new(StringComparer.Ordinal);

    public int Index { get; } = index;

    public RootSession Session { get; } = session;

    public IReadOnlyDictionary<string, TrackedSet> Sets => _sets;

    /// <summary>
    /// Rebuilds from a full scan at start: sets already up to date are done, the rest wait (through
    /// the stability gate); sets the ledger holds whose folders went while the service was stopped
    /// are retired. Returns the ids retired.
    /// </summary>
    public List<string> Start(DateTime now, double stableSeconds)
    {
        foreach (var s in Session.Catalog.Discover())
        {
            var t = new TrackedSet(s.SetId, now);
            bool upToDate = Session.Context.IsUpToDate(s);
            foreach (var f in s.Files)
            {
                t.Files[f.Key] = new TrackedFile(f, upToDate ? now.AddSeconds(-stableSeconds) : now);
            }
            if (upToDate)
            {
                t.Phase = SetPhase.Done;
                t.LastChangeUtc = DateTime.MinValue;
            }
            else
            {
                var rec = Session.Context.Store.GetSet(s.SetId);
                Session.Context.Store.SetState(s.SetId, rec?.DoneRun is null ? SetStates.Pending : SetStates.Stale, s.Profile,
                    rec?.DoneRun is null ? null : "inputs or settings changed since the last run");
            }
            _sets[s.SetId] = t;
        }
        return Session.ServedThisRootBefore ? SetRetirement.RetireMissing(Session.Context, _sets.Keys) : [];
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
        foreach (var set in _sets.Values.Where(s => s.Files.Count == 0 && s.Phase is not (SetPhase.Queued or SetPhase.Running)
            && (now - s.LastChangeUtc).TotalSeconds >= graceSeconds).ToList())
        {
            if (Session.Context.Store.GetSet(set.Id) is { State: not SetStates.Retired })
            {
                SetRetirement.Retire(Session.Context, set.Id);
                retired.Add(set.Id);
            }
            _sets.Remove(set.Id);
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
        var found = Session.Catalog.Discover().ToDictionary(s => s.SetId, StringComparer.Ordinal);
        var changed = new List<string>();
        foreach (var id in _sets.Keys.Union(found.Keys).ToList())
        {
            Reconcile(id, found.TryGetValue(id, out var s) ? s.Files : [], now, changed);
        }
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
        if (!_sets.TryGetValue(setId, out var set))
        {
            set = _sets[setId] = new TrackedSet(setId, now);
        }
        var info = new FileInfo(path);
        if (info.Exists)
        {
            var file = new InputFile(info.FullName, Session.Catalog.RootRelative(info.FullName), key, info.Length, info.LastWriteTimeUtc.Ticks);
            Upsert(set, file, now);
        }
        else if (set.Files.Remove(key))
        {
            Changed(set, now, $"{key} removed");
        }
        return true;
    }

    /// <summary>Looks again at files not yet past the stability gate (size and time unchanged across looks).</summary>
    public void Relook(DateTime now, double stableSeconds)
    {
        foreach (var set in _sets.Values.Where(s => s.Phase == SetPhase.Waiting))
        {
            foreach (var (key, tf) in set.Files.ToList())
            {
                if ((now - tf.StableSinceUtc).TotalSeconds >= stableSeconds)
                {
                    continue;
                }
                var info = new FileInfo(tf.File.FullPath);
                if (!info.Exists)
                {
                    set.Files.Remove(key);
                    Changed(set, now, $"{key} removed");
                }
                else
                {
                    Upsert(set, tf.File with { Size = info.Length, MtimeTicks = info.LastWriteTimeUtc.Ticks }, now);
                }
            }
        }
    }

    private void Reconcile(string setId, IReadOnlyList<InputFile> files, DateTime now, List<string> changed)
    {
        if (!_sets.TryGetValue(setId, out var set))
        {
            if (files.Count == 0)
            {
                return;
            }
            set = _sets[setId] = new TrackedSet(setId, now);
        }
        var keys = new HashSet<string>(files.Select(f => f.Key), StringComparer.Ordinal);
        foreach (var gone in set.Files.Keys.Where(k => !keys.Contains(k)).ToList())
        {
            set.Files.Remove(gone);
            Changed(set, now, $"{gone} removed");
        }
        foreach (var f in files)
        {
            if (Upsert(set, f, now))
            {
                changed.Add(f.FullPath);
            }
        }
    }

    /// <summary>Records the file's size and time; true when that is a change.</summary>
    private bool Upsert(TrackedSet set, InputFile file, DateTime now)
    {
        if (set.Files.TryGetValue(file.Key, out var tf))
        {
            if (tf.File.Size == file.Size && tf.File.MtimeTicks == file.MtimeTicks)
            {
                return false;
            }
            tf.File = file;
            tf.StableSinceUtc = now;
            Changed(set, now, $"{file.Key} replaced or still being written");
        }
        else
        {
            set.Files[file.Key] = new TrackedFile(file, now);
            Changed(set, now, $"{file.Key} added");
        }
        return true;
    }

    private void Changed(TrackedSet set, DateTime now, string what)
    {
        set.LastChangeUtc = now;
        set.TriggerUtc = now;
        switch (set.Phase)
        {
            case SetPhase.Done:
            case SetPhase.Failed:
                set.Phase = SetPhase.Waiting;
                set.FirstSeenUtc = now;
                Session.Context.Store.SetState(set.Id, SetStates.Stale, Session.Catalog.ProfileFor(set.Id), what);
                break;
            case SetPhase.Queued:
            case SetPhase.Running:
                set.ChangedWhileBusy = true;
                break;
            case SetPhase.Waiting:
                break;
        }
    }

    /// <summary>After a settings reload: done sets whose fingerprint changed become stale and wait.</summary>
    public int ApplySettingsChange(DateTime now)
    {
        int n = 0;
        foreach (var set in _sets.Values.Where(s => s.Phase is SetPhase.Done or SetPhase.Failed))
        {
            var inputs = Session.Catalog.Build(set.Id, set.Files.Values.Select(f => f.File));
            if (!Session.Context.IsUpToDate(inputs))
            {
                set.Phase = SetPhase.Waiting;
                set.FirstSeenUtc = now;
                set.TriggerUtc = now;
                Session.Context.Store.SetState(set.Id, SetStates.Stale, inputs.Profile, "settings changed");
                n++;
            }
        }
        return n;
    }

    /// <summary>Sets that are complete now, as jobs (their stable files only when overdue).</summary>
    public IEnumerable<SetJob> Ready(DateTime now, double stableSeconds)
    {
        foreach (var set in _sets.Values.Where(s => s.Phase == SetPhase.Waiting && s.RetryAfterUtc <= now).OrderBy(s => s.FirstSeenUtc).ThenBy(s => s.Id, StringComparer.Ordinal))
        {
            var stable = set.Files.Values.Where(f => (now - f.StableSinceUtc).TotalSeconds >= stableSeconds).Select(f => f.File).ToList();
            string profile = Session.Catalog.ProfileFor(set.Id);
            var completion = Session.Context.Options.Profile(profile).Completion;
            string marker = completion.ReadyMarker;
            string? markerFolder = Session.Catalog.MarkerFolder(set.Id);
            bool hasMarker = marker.Length > 0 && markerFolder is not null && File.Exists(Path.Combine(markerFolder, marker));
            var snap = new SetSnapshot(stable.Count, set.Files.Count - stable.Count, set.FirstSeenUtc, set.LastChangeUtc, hasMarker);
            var (decision, why) = SetCompletionPolicy.Decide(completion, snap, now);
            set.LastWhy = why;
            if (decision == CompletionDecision.Wait)
            {
                continue;
            }
            var inputs = Session.Catalog.Build(set.Id, stable);
            if (decision == CompletionDecision.Complete && Session.Context.IsUpToDate(inputs))
            {
                set.Phase = SetPhase.Done; // back to what the last run saw (e.g. a file replaced by an identical copy)
                Session.Context.Store.SetState(set.Id, SetStates.Done, inputs.Profile);
                continue;
            }
            yield return new SetJob(Index, inputs, decision == CompletionDecision.Overdue);
        }
    }

    /// <summary>How long a deferred set waits before it is offered again (another node's run or an outage usually ends sooner than a lease).</summary>
    public TimeSpan DeferredRetry { get; init; } = TimeSpan.FromSeconds(5);

    public void Queued(string setId)
    {
        var set = _sets[setId];
        set.Phase = SetPhase.Queued;
        set.ChangedWhileBusy = false;
    }

    public void Finished(SetJob job, SetOutcome outcome, DateTime now)
    {
        if (!_sets.TryGetValue(outcome.SetId, out var set))
        {
            return;
        }
        set.Phase = outcome.Kind switch
        {
            SetOutcomeKind.Done or SetOutcomeKind.Unchanged => SetPhase.Done,
            SetOutcomeKind.Failed => SetPhase.Failed,
            _ => SetPhase.Waiting,
        };
        if (outcome.Kind == SetOutcomeKind.Changed)
        {
            set.LastChangeUtc = now;
        }
        if (outcome.Kind == SetOutcomeKind.Deferred)
        {
            set.RetryAfterUtc = now + DeferredRetry;
            set.LastWhy = outcome.Reason ?? "deferred";
        }
        if (set.ChangedWhileBusy && set.Phase is SetPhase.Done or SetPhase.Failed)
        {
            set.Phase = SetPhase.Waiting;
            set.FirstSeenUtc = now;
            Session.Context.Store.SetState(set.Id, SetStates.Stale, Session.Catalog.ProfileFor(set.Id), "inputs changed while the set was processed");
        }
        else if (set.Phase == SetPhase.Done && !SameFiles(set, job.Set))
        {
            // An overdue run took only the stable files; the others still need a complete run.
            set.Phase = SetPhase.Waiting;
            set.FirstSeenUtc = now;
            Session.Context.Store.SetState(set.Id, SetStates.Stale, job.Set.Profile, "files that were still changing at the maximum wait");
        }
        set.ChangedWhileBusy = false;
    }

    private static bool SameFiles(TrackedSet set, SetInputs inputs) =>
        set.Files.Count == inputs.Files.Count
        && inputs.Files.All(f => set.Files.TryGetValue(f.Key, out var t) && t.File.Size == f.Size && t.File.MtimeTicks == f.MtimeTicks);
}
