using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Host.Service;

/// <summary>A ledger write the lifecycle decided: the set's state, its profile and why.</summary>
internal sealed record SetStateNote(string SetId, string State, string Profile, string? Reason = null);

/// <summary>What the lifecycle asks about a set and cannot know itself (the catalog, the settings, the ledger, the disk).</summary>
internal interface ISetFacts
{
    string ProfileFor(string setId);

    /// <summary>The completion rule of a profile under the current settings.</summary>
    CompletionSettings CompletionFor(string profile);

    /// <summary>Whether the set's folder holds the ready marker file of that name.</summary>
    bool HasReadyMarker(string setId, string marker);

    SetInputs Build(string setId, IEnumerable<InputFile> files);

    /// <summary>The ledger's last finished run used these inputs under the current settings, and its manifest exists.</summary>
    bool IsUpToDate(SetInputs inputs);
}

/// <summary>
/// The scheduler's decisions for one root, with no I/O and no clock of its own: every set with its
/// files, the stability gate, completion, and the lifecycle (a done set whose inputs change becomes
/// stale and waits again). It is fed what the file polling saw and the time, asks
/// <see cref="ISetFacts"/> what it cannot know, and says which ledger writes to make
/// (<see cref="TakeNotes"/>). <see cref="RootTracker"/> does the polling and the writes.
/// </summary>
internal sealed class SetLifecycle(ISetFacts facts)
{
    private readonly Dictionary<string, TrackedSet> _sets = new(StringComparer.Ordinal);
    private readonly List<SetStateNote> _notes = [];

    public IReadOnlyDictionary<string, TrackedSet> Sets => _sets;

    /// <summary>How long a deferred set waits before it is offered again (another node's run or an outage usually ends sooner than a lease).</summary>
    public TimeSpan DeferredRetry { get; init; } = TimeSpan.FromSeconds(5);

    /// <summary>The ledger writes decided since the last call, in the order decided.</summary>
    public List<SetStateNote> TakeNotes()
    {
        var notes = _notes.ToList();
        _notes.Clear();
        return notes;
    }

    /// <summary>
    /// A set found by the scan at start: up to date means done (its files past the gate); otherwise it
    /// waits through the gate, pending if it was never done, else stale.
    /// </summary>
    public void Found(SetInputs set, bool upToDate, bool doneBefore, DateTime now, double stableSeconds)
    {
        ArgumentNullException.ThrowIfNull(set);
        var t = new TrackedSet(set.SetId, now);
        foreach (var f in set.Files)
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
            _notes.Add(new SetStateNote(set.SetId, doneBefore ? SetStates.Stale : SetStates.Pending, set.Profile,
                doneBefore ? "inputs or settings changed since the last run" : null));
        }
        _sets[set.SetId] = t;
    }

    /// <summary>
    /// Sets left without any input file (their folder removed) for at least
    /// <paramref name="graceSeconds"/>, and not queued or running: the caller retires or forgets them.
    /// </summary>
    public List<string> Emptied(DateTime now, double graceSeconds) =>
        [.. _sets.Values.Where(s => s.Files.Count == 0 && s.Phase is not (SetPhase.Queued or SetPhase.Running)
            && (now - s.LastChangeUtc).TotalSeconds >= graceSeconds).Select(s => s.Id)];

    public void Forget(string setId) => _sets.Remove(setId);

    /// <summary>
    /// A full rescan: every set's file list reconciled with what it found. Returns the full paths of
    /// files found added or changed (the watcher should have reported them).
    /// </summary>
    public List<string> Reconcile(IReadOnlyDictionary<string, IReadOnlyList<InputFile>> found, DateTime now)
    {
        ArgumentNullException.ThrowIfNull(found);
        var changed = new List<string>();
        foreach (var id in _sets.Keys.Union(found.Keys).ToList())
        {
            var files = found.TryGetValue(id, out var f) ? f : [];
            if (!_sets.TryGetValue(id, out var set))
            {
                if (files.Count == 0)
                {
                    continue;
                }
                set = _sets[id] = new TrackedSet(id, now);
            }
            var keys = new HashSet<string>(files.Select(x => x.Key), StringComparer.Ordinal);
            foreach (var gone in set.Files.Keys.Where(k => !keys.Contains(k)).ToList())
            {
                set.Files.Remove(gone);
                Changed(set, now, $"{gone} removed");
            }
            changed.AddRange(files.Where(x => Upsert(set, x, now)).Select(x => x.FullPath));
        }
        return changed;
    }

    /// <summary>One file of a set as just looked at: its size and time, or null when it is gone.</summary>
    public void Observed(string setId, string key, InputFile? file, DateTime now)
    {
        if (!_sets.TryGetValue(setId, out var set))
        {
            set = _sets[setId] = new TrackedSet(setId, now);
        }
        if (file is not null)
        {
            Upsert(set, file, now);
        }
        else if (set.Files.Remove(key))
        {
            Changed(set, now, $"{key} removed");
        }
    }

    /// <summary>Files of waiting sets not yet past the stability gate: the caller looks at them again (<see cref="Observed"/>).</summary>
    public List<(string SetId, InputFile File)> InGate(DateTime now, double stableSeconds) =>
        [.. _sets.Values.Where(s => s.Phase == SetPhase.Waiting)
            .SelectMany(s => s.Files.Values.Where(tf => (now - tf.StableSinceUtc).TotalSeconds < stableSeconds).Select(tf => (s.Id, tf.File)))];

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
                Wait(set, now, facts.ProfileFor(set.Id), what);
                break;
            case SetPhase.Queued:
            case SetPhase.Running:
                set.ChangedWhileBusy = true;
                break;
            case SetPhase.Waiting:
                break;
        }
    }

    /// <summary>After a settings reload: done sets whose fingerprint changed become stale and wait. Returns how many.</summary>
    public int SettingsChanged(DateTime now)
    {
        int n = 0;
        foreach (var set in _sets.Values.Where(s => s.Phase is SetPhase.Done or SetPhase.Failed))
        {
            var inputs = facts.Build(set.Id, set.Files.Values.Select(f => f.File));
            if (!facts.IsUpToDate(inputs))
            {
                set.TriggerUtc = now;
                Wait(set, now, inputs.Profile, "settings changed");
                n++;
            }
        }
        return n;
    }

    /// <summary>Sets that are complete now, as jobs (their stable files only when overdue), oldest first.</summary>
    public List<SetJob> Ready(int root, DateTime now, double stableSeconds)
    {
        var jobs = new List<SetJob>();
        foreach (var set in _sets.Values.Where(s => s.Phase == SetPhase.Waiting && s.RetryAfterUtc <= now)
            .OrderBy(s => s.FirstSeenUtc).ThenBy(s => s.Id, StringComparer.Ordinal).ToList())
        {
            var stable = set.Files.Values.Where(f => (now - f.StableSinceUtc).TotalSeconds >= stableSeconds).Select(f => f.File).ToList();
            var completion = facts.CompletionFor(facts.ProfileFor(set.Id));
            bool hasMarker = completion.ReadyMarker.Length > 0 && facts.HasReadyMarker(set.Id, completion.ReadyMarker);
            var snap = new SetSnapshot(stable.Count, set.Files.Count - stable.Count, set.FirstSeenUtc, set.LastChangeUtc, hasMarker);
            var (decision, why) = SetCompletionPolicy.Decide(completion, snap, now);
            set.LastWhy = why;
            if (decision == CompletionDecision.Wait)
            {
                continue;
            }
            var inputs = facts.Build(set.Id, stable);
            if (decision == CompletionDecision.Complete && facts.IsUpToDate(inputs))
            {
                set.Phase = SetPhase.Done; // back to what the last run saw (e.g. a file replaced by an identical copy)
                _notes.Add(new SetStateNote(set.Id, SetStates.Done, inputs.Profile));
                continue;
            }
            jobs.Add(new SetJob(root, inputs, decision == CompletionDecision.Overdue));
        }
        return jobs;
    }

    public void Queued(string setId)
    {
        var set = _sets[setId];
        set.Phase = SetPhase.Queued;
        set.ChangedWhileBusy = false;
    }

    /// <summary>A queued set handed to a worker.</summary>
    public void Running(string setId) => _sets[setId].Phase = SetPhase.Running;

    public void Finished(SetJob job, SetOutcome outcome, DateTime now)
    {
        ArgumentNullException.ThrowIfNull(job);
        ArgumentNullException.ThrowIfNull(outcome);
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
            Wait(set, now, facts.ProfileFor(set.Id), "inputs changed while the set was processed");
        }
        else if (set.Phase == SetPhase.Done && !SameFiles(set, job.Set))
        {
            // An overdue run took only the stable files; the others still need a complete run.
            Wait(set, now, job.Set.Profile, "files that were still changing at the maximum wait");
        }
        set.ChangedWhileBusy = false;
    }

    /// <summary>A done or failed set waits again, recorded stale.</summary>
    private void Wait(TrackedSet set, DateTime now, string profile, string why)
    {
        set.Phase = SetPhase.Waiting;
        set.FirstSeenUtc = now;
        _notes.Add(new SetStateNote(set.Id, SetStates.Stale, profile, why));
    }

    private static bool SameFiles(TrackedSet set, SetInputs inputs) =>
        set.Files.Count == inputs.Files.Count
        && inputs.Files.All(f => set.Files.TryGetValue(f.Key, out var t) && t.File.Size == f.Size && t.File.MtimeTicks == f.MtimeTicks);
}
