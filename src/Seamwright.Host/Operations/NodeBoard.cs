using System.Data.Common;
using Seamwright.Pipeline.Processing;

namespace Seamwright.Host.Operations;

/// <summary>One node as the metrics endpoint shows it: its last heartbeat and the sets it holds now.</summary>
/// <param name="OutputRoot">The output root whose ledger names the node.</param>
/// <param name="LastHeartbeatUtc">On a shared ledger the node's last beat in the database's clock; with SQLite the time of the read (this process, the only node).</param>
/// <param name="HeartbeatAgeSeconds">How old that beat was when read, by the same clock.</param>
/// <param name="Sets">Sets the node holds claims on (shared ledger) or has runs in progress of (SQLite).</param>
internal sealed record NodeFigure(string OutputRoot, string Node, DateTime LastHeartbeatUtc, double HeartbeatAgeSeconds, int Sets);

/// <summary>
/// The nodes of each output root's ledger, read in the background when the operations loop asks
/// (<see cref="Refresh"/>, once per tick, never more than one read in flight) and kept for the
/// metrics endpoint, so a scrape never waits on the database. While the ledger cannot be read the
/// last list read stands (the <c>healthy</c> gauge and /health say the ledger is unreachable) and
/// <see cref="ReadUtc"/> stops advancing.
/// </summary>
internal sealed class NodeBoard(IReadOnlyList<ProcessingContext> roots, TimeProvider time)
{
    private readonly Lock _gate = new();
    private readonly Dictionary<string, (IReadOnlyList<NodeFigure> Nodes, DateTimeOffset ReadAt)> _last = new(StringComparer.Ordinal);
    private Task? _reading;

    /// <summary>Starts a read of every root's nodes unless one is still running; returns that read (tests wait on it).</summary>
    public Task Refresh()
    {
        lock (_gate)
        {
            if (_reading is { IsCompleted: false })
            {
                return _reading;
            }
            return _reading = Task.Run(ReadAll);
        }
    }

    /// <summary>Every node of every root as last read.</summary>
    public IReadOnlyList<NodeFigure> Nodes()
    {
        lock (_gate)
        {
            return [.. _last.Values.SelectMany(v => v.Nodes)];
        }
    }

    /// <summary>Per output root, when its nodes were last read successfully.</summary>
    public IReadOnlyList<(string Root, DateTimeOffset At)> ReadUtc()
    {
        lock (_gate)
        {
            return [.. _last.Select(kv => (kv.Key, kv.Value.ReadAt))];
        }
    }

    private void ReadAll()
    {
        foreach (var ctx in roots)
        {
            try
            {
                var nodes = Read(ctx);
                lock (_gate)
                {
                    _last[ctx.OutputRoot] = (nodes, time.GetUtcNow());
                }
            }
            catch (DbException)
            {
                // The ledger is unreachable: the last list stands; the ledger loop's silence makes the service unhealthy.
            }
            catch (Exception e) when (e is ObjectDisposedException or InvalidOperationException)
            {
                return; // the service is stopping (its ledgers are closed)
            }
        }
    }

    private IReadOnlyList<NodeFigure> Read(ProcessingContext ctx)
    {
        if (ctx.Store.IsShared)
        {
            return [.. ctx.Store.Nodes().Select(n => new NodeFigure(ctx.OutputRoot, n.Node, n.LastBeatUtc,
                Math.Max(0, (n.DatabaseNowUtc - n.LastBeatUtc).TotalSeconds), n.Sets.Count))];
        }
        // One node owns a SQLite ledger (the output root's lock): this process, beating now.
        return [new NodeFigure(ctx.OutputRoot, ctx.NodeName, time.GetUtcNow().UtcDateTime, 0, ctx.Store.RunningSets().Count)];
    }
}
