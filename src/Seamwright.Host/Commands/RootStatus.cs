using Seamwright.Host.Operations;
using Seamwright.Pipeline.State;

namespace Seamwright.Host.Commands;

/// <summary>Counts of sets by state.</summary>
internal sealed record SetCounts(int Total, int Done, int Pending, int Running, int Stale, int Failed, int Incomplete, int Retired = 0);

/// <summary>Counts of input files by state.</summary>
internal sealed record FileCounts(int Total, int Analysed, int Bad, int Waiting);

/// <summary>Counts of runs by state.</summary>
internal sealed record RunCounts(int Total, int Finished, int Abandoned, int Running);

/// <summary>Pair counts over every set's latest run.</summary>
internal sealed record PairCounts(int Total, int Accepted, int Weak, int Rejected);

/// <summary>A set or file named with its state and reason.</summary>
internal sealed record NamedReason(string Name, string State, string? Reason);

/// <summary>The last finished run (and the node that made it, on a shared ledger).</summary>
internal sealed record LastRun(long RunId, string Set, DateTime? FinishedUtc, string? Node = null);

/// <summary>A node sharing the ledger: its last heartbeat (age by the database's clock), alive while within a lease, and the sets it holds claims on.</summary>
internal sealed record NodeStatus(string Node, int ProcessId, DateTime LastHeartbeatUtc, double HeartbeatAgeSeconds, bool Alive, IReadOnlyList<string> Sets);

/// <summary>The service block: its judged state and the figures of its last heartbeat (null when there is none).</summary>
internal sealed record ServiceStatus(string State, bool Healthy, string? Note, double? HeartbeatAgeSeconds, OperationsFigures? Figures);

/// <summary>
/// Everything `seamwright status` says about one output root, read once: the text output and the
/// JSON output (<c>--json</c>) are both rendered from this, so they hold the same figures.
/// </summary>
internal sealed record RootStatus(
    string Schema,
    string OutputRoot,
    bool Processed,
    SetCounts Sets,
    FileCounts Files,
    RunCounts Runs,
    PairCounts Pairs,
    IReadOnlyList<NamedReason> SetsNotDone,
    IReadOnlyList<NamedReason> BadFiles,
    LastRun? LastFinishedRun,
    ServiceStatus Service,
    IReadOnlyList<NodeStatus>? Nodes = null)
{
    public const string SchemaId = "seamwright.status.v1";

    /// <summary>Exit code for this root: 0 running and healthy, 4 no service running, 5 unhealthy or not responding.</summary>
    public int ExitCode => ServiceState.ExitCode(Service.State, Service.Healthy);

    public static RootStatus Read(string output, DateTimeOffset now, Pipeline.Settings.StateSettings? state = null)
    {
        var service = ReadService(output, now);
        StateStore store;
        try
        {
            store = StateStore.Open(output, state, readOnly: true);
        }
        catch (FileNotFoundException)
        {
            return new RootStatus(SchemaId, output, false, new SetCounts(0, 0, 0, 0, 0, 0, 0), new FileCounts(0, 0, 0, 0),
                new RunCounts(0, 0, 0, 0), new PairCounts(0, 0, 0, 0), [], [], null, service);
        }
        using (store)
        {
            var sets = store.Sets();
            var runs = store.Runs();
            var live = store.Files().Where(f => f.State != "removed").ToList();
            var done = runs.Where(r => r.State == "done" && r.Summary is not null).ToList();
            var current = sets.Where(s => s.DoneRun is not null && s.State != SetStates.Retired).Select(s => runs.FirstOrDefault(r => r.RunId == s.DoneRun)?.Summary).OfType<RunSummary>().ToList();
            int Count(string state) => sets.Count(s => s.State == state);
            return new RootStatus(SchemaId, output, true,
                new SetCounts(sets.Count, Count(SetStates.Done), Count(SetStates.Pending), Count(SetStates.Running), Count(SetStates.Stale), Count(SetStates.Failed),
                    sets.Count(s => s.State == SetStates.Done && s.Incomplete), Count(SetStates.Retired)),
                new FileCounts(live.Count, live.Count(f => f.State == "analysed"), live.Count(f => f.State == "bad"), live.Count(f => f.State == "seen")),
                new RunCounts(runs.Count, done.Count, runs.Count(r => r.State == "abandoned"), runs.Count(r => r.State == "running")),
                new PairCounts(current.Sum(s => s.Pairs), current.Sum(s => s.Accepted), current.Sum(s => s.Weak), current.Sum(s => s.Rejected)),
                sets.Where(s => s.State != SetStates.Done).Select(s => new NamedReason(s.SetId, s.State, s.Reason)).ToList(),
                live.Where(f => f.State == "bad").Select(f => new NamedReason(f.Path, f.State, f.Reason)).ToList(),
                done.Count > 0 ? new LastRun(done[^1].RunId, done[^1].SetId, done[^1].FinishedUtc, done[^1].Node) : null,
                service,
                store.IsShared ? ReadNodes(store, state!.LeaseSeconds) : null);
        }
    }

    private static List<NodeStatus> ReadNodes(StateStore store, double leaseSeconds) =>
        store.Nodes().Select(n =>
        {
            double age = Math.Round(Math.Max(0, (n.DatabaseNowUtc - n.LastBeatUtc).TotalSeconds), 1);
            return new NodeStatus(n.Node, n.ProcessId, n.LastBeatUtc, age, age <= leaseSeconds, n.Sets);
        }).ToList();

    /// <summary>The service of this output root, from the heartbeat file it rewrites while healthy.</summary>
    private static ServiceStatus ReadService(string output, DateTimeOffset now)
    {
        var f = HeartbeatFile.TryRead(Path.Combine(output, StateStore.StateFolder, HeartbeatFile.FileName));
        double beat = f is { HeartbeatSeconds: > 0 } ? f.HeartbeatSeconds : 10;
        var (state, note) = ServiceState.Judge(f, now, TimeSpan.FromSeconds(3 * beat), ServiceState.ProcessAlive);
        bool healthy = state == ServiceState.Running && f!.Healthy;
        return new ServiceStatus(state, healthy, note, f is null ? null : Math.Round(Math.Max(0, (now - f.At).TotalSeconds), 1), f);
    }
}
