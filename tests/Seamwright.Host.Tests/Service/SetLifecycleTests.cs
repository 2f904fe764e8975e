using Seamwright.Host.Service;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Host.Tests.Service;

/// <summary>
/// The scheduler's lifecycle decisions alone: in-memory files, a fake ledger answer and explicit
/// times (no process, no disk, no real clock).
/// </summary>
public sealed class SetLifecycleTests
{
    private static readonly DateTime T0 = new(2026, 12, 3, 12, 0, 0, DateTimeKind.Utc);
    private const double Stable = 2;

    /// <summary>Facts from memory: one profile, its completion rule, which sets are up to date, which have the marker.</summary>
    private sealed class Facts : ISetFacts
    {
        public CompletionSettings Completion { get; } = new() { QuietSeconds = 10, MaxWaitSeconds = 600 };
        public HashSet<string> UpToDate { get; } = [];
        public HashSet<string> Markers { get; } = [];

        public string ProfileFor(string setId) => "default";

        public CompletionSettings CompletionFor(string profile) => Completion;

        public bool HasReadyMarker(string setId, string marker) => Markers.Contains(setId);

        public SetInputs Build(string setId, IEnumerable<InputFile> files) =>
            new(setId, "default", [.. files.OrderBy(f => f.Key, StringComparer.Ordinal)], Markers.Contains(setId));

        public bool IsUpToDate(SetInputs inputs) => UpToDate.Contains(inputs.SetId + "|" + inputs.InputsDigest());

        public void MarkDone(SetInputs inputs) => UpToDate.Add(inputs.SetId + "|" + inputs.InputsDigest());
    }

    private static InputFile File(string set, string name, long size = 100, long mtime = 1) =>
        new($"/in/{set}/{name}", $"{set}/{name}", name, size, mtime);

    private static SetInputs Set(string id, params InputFile[] files) => new(id, "default", files, false);

    private static SetOutcome Outcome(string set, SetOutcomeKind kind, string? reason = null) => new(set, kind, 1, null, reason);

    [Fact]
    public void NewFiles_WaitForTheGateAndTheQuietPeriod_ThenOneJob()
    {
        var facts = new Facts();
        var life = new SetLifecycle(facts);
        life.Observed("s", "a.png", File("s", "a.png"), T0);
        life.Observed("s", "b.png", File("s", "b.png"), T0);

        Assert.Empty(life.Ready(0, T0.AddSeconds(1), Stable)); // inside the gate
        Assert.Equal("2 files still changing", life.Sets["s"].LastWhy);
        Assert.Empty(life.Ready(0, T0.AddSeconds(5), Stable)); // stable, not yet quiet for 10 s
        var job = Assert.Single(life.Ready(0, T0.AddSeconds(11), Stable));
        Assert.Equal(2, job.Set.Files.Count);
        Assert.False(job.Incomplete);
    }

    [Fact]
    public void Start_UpToDateSetIsDone_ChangedOneIsStaleAndNeverDoneOneIsPending()
    {
        var facts = new Facts();
        var life = new SetLifecycle(facts);
        life.Found(Set("done", File("done", "a.png")), upToDate: true, doneBefore: true, T0, Stable);
        life.Found(Set("changed", File("changed", "a.png")), upToDate: false, doneBefore: true, T0, Stable);
        life.Found(Set("new", File("new", "a.png")), upToDate: false, doneBefore: false, T0, Stable);

        Assert.Equal(SetPhase.Done, life.Sets["done"].Phase);
        Assert.Equal(
            [new SetStateNote("changed", SetStates.Stale, "default", "inputs or settings changed since the last run"), new SetStateNote("new", SetStates.Pending, "default")],
            life.TakeNotes());
        Assert.Empty(life.TakeNotes());
    }

    [Fact]
    public void DoneSet_FileReplaced_BecomesStaleAndWaitsAgain()
    {
        var facts = new Facts();
        var life = new SetLifecycle(facts);
        life.Found(Set("s", File("s", "a.png")), upToDate: true, doneBefore: true, T0, Stable);

        life.Observed("s", "a.png", File("s", "a.png", size: 200, mtime: 2), T0.AddSeconds(30));

        Assert.Equal(SetPhase.Waiting, life.Sets["s"].Phase);
        Assert.Equal([new SetStateNote("s", SetStates.Stale, "default", "a.png replaced or still being written")], life.TakeNotes());
        // The same size and time again is no change.
        life.Observed("s", "a.png", File("s", "a.png", size: 200, mtime: 2), T0.AddSeconds(31));
        Assert.Empty(life.TakeNotes());
    }

    [Fact]
    public void ChangeWhileRunning_RunEndsDone_SetWaitsAgainStale()
    {
        var facts = new Facts();
        var life = new SetLifecycle(facts);
        life.Observed("s", "a.png", File("s", "a.png"), T0);
        var job = Assert.Single(life.Ready(0, T0.AddSeconds(20), Stable));
        life.Queued("s");
        life.Running("s");
        life.Observed("s", "b.png", File("s", "b.png"), T0.AddSeconds(21));
        Assert.Equal(SetPhase.Running, life.Sets["s"].Phase);
        Assert.Empty(life.TakeNotes());

        life.Finished(job, Outcome("s", SetOutcomeKind.Done), T0.AddSeconds(25));

        Assert.Equal(SetPhase.Waiting, life.Sets["s"].Phase);
        Assert.Equal([new SetStateNote("s", SetStates.Stale, "default", "inputs changed while the set was processed")], life.TakeNotes());
    }

    [Fact]
    public void Overdue_StableFilesGoIncomplete_ThenTheLateFileMakesItStale()
    {
        var facts = new Facts();
        facts.Completion.MaxWaitSeconds = 60;
        var life = new SetLifecycle(facts);
        life.Observed("s", "a.png", File("s", "a.png"), T0);
        // b.png keeps changing: at every look its size differs.
        for (int t = 0; t <= 61; t++)
        {
            life.Observed("s", "b.png", File("s", "b.png", size: 100 + t, mtime: t), T0.AddSeconds(t));
        }
        var job = Assert.Single(life.Ready(0, T0.AddSeconds(61.5), Stable));
        Assert.True(job.Incomplete);
        Assert.Equal(["a.png"], job.Set.Files.Select(f => f.Key));
        life.Queued("s");
        life.Running("s");
        life.Finished(job, Outcome("s", SetOutcomeKind.Done), T0.AddSeconds(70));

        Assert.Equal(SetPhase.Waiting, life.Sets["s"].Phase);
        Assert.Contains(life.TakeNotes(), n => n.State == SetStates.Stale && n.Reason == "files that were still changing at the maximum wait");
    }

    [Fact]
    public void ReadyMarker_CompletesWithoutTheQuietPeriod_AndAnUpToDateSetGoesBackToDone()
    {
        var facts = new Facts();
        facts.Completion.ReadyMarker = "READY";
        var life = new SetLifecycle(facts);
        life.Observed("s", "a.png", File("s", "a.png"), T0);
        Assert.Empty(life.Ready(0, T0.AddSeconds(5), Stable));
        Assert.Contains("ready marker", life.Sets["s"].LastWhy, StringComparison.Ordinal);
        facts.Markers.Add("s");
        var job = Assert.Single(life.Ready(0, T0.AddSeconds(5), Stable));

        // A file replaced by an identical copy: the ledger says up to date, so no job, back to done.
        facts.MarkDone(job.Set);
        life.Queued("s");
        life.Finished(job, Outcome("s", SetOutcomeKind.Done), T0.AddSeconds(6));
        life.TakeNotes();
        life.Observed("s", "a.png", File("s", "a.png", size: 100, mtime: 9), T0.AddSeconds(7));
        life.Observed("s", "a.png", File("s", "a.png", size: 100, mtime: 1), T0.AddSeconds(8));
        Assert.Equal(SetPhase.Waiting, life.Sets["s"].Phase);
        Assert.Empty(life.Ready(0, T0.AddSeconds(20), Stable));
        Assert.Equal(SetPhase.Done, life.Sets["s"].Phase);
        Assert.Equal(new SetStateNote("s", SetStates.Done, "default"), life.TakeNotes().Last());
    }

    [Fact]
    public void SettingsChange_OnlySetsNoLongerUpToDateWait()
    {
        var facts = new Facts();
        var life = new SetLifecycle(facts);
        var same = Set("same", File("same", "a.png"));
        life.Found(same, upToDate: true, doneBefore: true, T0, Stable);
        life.Found(Set("other", File("other", "a.png")), upToDate: true, doneBefore: true, T0, Stable);
        facts.MarkDone(same);

        Assert.Equal(1, life.SettingsChanged(T0.AddSeconds(1)));

        Assert.Equal(SetPhase.Done, life.Sets["same"].Phase);
        Assert.Equal(SetPhase.Waiting, life.Sets["other"].Phase);
        Assert.Equal([new SetStateNote("other", SetStates.Stale, "default", "settings changed")], life.TakeNotes());
    }

    [Fact]
    public void Rescan_FindsWhatTheWatcherMissed_AndAnEmptiedSetIsOfferedForRetirementAfterTheGrace()
    {
        var facts = new Facts();
        var life = new SetLifecycle(facts);
        life.Found(Set("s", File("s", "a.png")), upToDate: true, doneBefore: true, T0, Stable);
        var found = new Dictionary<string, IReadOnlyList<InputFile>> { ["s"] = [File("s", "a.png"), File("s", "b.png")] };

        Assert.Equal(["/in/s/b.png"], life.Reconcile(found, T0.AddSeconds(1)));
        Assert.Empty(life.Reconcile(found, T0.AddSeconds(2)));

        // The folder goes: every file removed; retirement waits for the grace and never takes a busy set.
        life.Reconcile(new Dictionary<string, IReadOnlyList<InputFile>>(), T0.AddSeconds(3));
        Assert.Empty(life.Sets["s"].Files);
        Assert.Empty(life.Emptied(T0.AddSeconds(4), graceSeconds: 5));
        Assert.Equal(["s"], life.Emptied(T0.AddSeconds(8), graceSeconds: 5));
        life.Forget("s");
        Assert.False(life.Sets.ContainsKey("s"));
    }

    [Fact]
    public void Deferred_IsNotOfferedAgainBeforeTheRetryDelay()
    {
        var facts = new Facts();
        var life = new SetLifecycle(facts) { DeferredRetry = TimeSpan.FromSeconds(30) };
        life.Observed("s", "a.png", File("s", "a.png"), T0);
        var job = Assert.Single(life.Ready(0, T0.AddSeconds(20), Stable));
        life.Queued("s");
        life.Finished(job, Outcome("s", SetOutcomeKind.Deferred, "claimed by node-b"), T0.AddSeconds(21));

        Assert.Empty(life.Ready(0, T0.AddSeconds(40), Stable));
        Assert.Equal("claimed by node-b", life.Sets["s"].LastWhy);
        Assert.Single(life.Ready(0, T0.AddSeconds(52), Stable));
    }

    [Fact]
    public void InGate_ListsOnlyUnsettledFilesOfWaitingSets()
    {
        var facts = new Facts();
        var life = new SetLifecycle(facts);
        life.Observed("s", "a.png", File("s", "a.png"), T0);
        life.Observed("s", "b.png", File("s", "b.png"), T0.AddSeconds(3));
        life.Found(Set("d", File("d", "x.png")), upToDate: true, doneBefore: true, T0.AddSeconds(3), Stable);

        Assert.Equal(["b.png"], life.InGate(T0.AddSeconds(4), Stable).Select(x => x.File.Key));
        // Looked at again and gone: the set records the removal.
        life.Observed("s", "b.png", null, T0.AddSeconds(4));
        Assert.Equal(["a.png"], life.Sets["s"].Files.Keys);
    }
}
