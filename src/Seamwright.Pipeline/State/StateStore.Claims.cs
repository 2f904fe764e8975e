namespace Seamwright.Pipeline.State;

/// <summary>
/// Claims and node heartbeats (schema version 2). A set is worked on by the node holding its claim
/// row; the claim carries a lease in the database's clock, renewed by the node's heartbeat. The
/// claim is decided under a row lock taken with SKIP LOCKED, so two nodes never both win and a
/// node never waits on another's decision. A lease that ran out (a dead or cut-off node) may be
/// taken over; every run of the set still marked running is then abandoned, and the old holder refuses to
/// publish (<see cref="HoldsClaim"/> fails).
/// </summary>
public sealed partial class StateStore
{
    /// <summary>Tries to claim <paramref name="setId"/> for <paramref name="node"/> for <paramref name="leaseMilliseconds"/>.</summary>
    public ClaimAttempt TryClaim(string setId, string node, long leaseMilliseconds) => _ledger.Use(db =>
    {
        string now = _ledger.NowMilliseconds;
        using (var seed = db.BeginTransaction())
        {
            Exec(db, seed, "INSERT INTO claims(set_id, node, lease_until, claimed) VALUES(@s, NULL, 0, 0) ON CONFLICT(set_id) DO NOTHING", ("s", setId));
            seed.Commit();
        }
        using var tx = db.BeginTransaction();
        var row = Query(db, tx, $"SELECT node, lease_until, {now} FROM claims WHERE set_id=@s" + _ledger.ForUpdateSkipLocked,
            r => (Holder: r.IsDBNull(0) ? null : r.GetString(0), Until: L(r, 1), Now: L(r, 2)), ("s", setId));
        if (row.Count == 0)
        {
            tx.Rollback();
            return new ClaimAttempt(false, "(another node, deciding now)", false);
        }
        var (holder, until, _) = row[0];
        bool heldElsewhere = holder is not null && holder != node;
        if (heldElsewhere && until > row[0].Now)
        {
            tx.Rollback();
            return new ClaimAttempt(false, holder, false);
        }
        // The claim is exclusive: any run of the set still marked running is dead (a previous holder
        // whose lease ran out, or this node's own run cut off by a ledger outage).
        Exec(db, tx, "UPDATE runs SET state='abandoned', finished=@t WHERE set_id=@s AND state='running'",
            ("t", DateTime.UtcNow.Ticks), ("s", setId));
        Exec(db, tx, $"UPDATE claims SET node=@n, lease_until={now} + @l, claimed={now}, run_id=NULL WHERE set_id=@s",
            ("n", node), ("l", leaseMilliseconds), ("s", setId));
        tx.Commit();
        return new ClaimAttempt(true, holder, heldElsewhere);
    });

    /// <summary>
    /// True when <paramref name="node"/> still holds an unexpired claim on the set; the lease is
    /// extended in the same statement. Checked before anything of a run is published.
    /// </summary>
    public bool HoldsClaim(string setId, string node, long leaseMilliseconds)
    {
        string now = _ledger.NowMilliseconds;
        return _ledger.Use(db => Exec(db, null,
            $"UPDATE claims SET lease_until={now} + @l WHERE set_id=@s AND node=@n AND lease_until > {now}",
            ("l", leaseMilliseconds), ("s", setId), ("n", node))) == 1;
    }

    /// <summary>Gives up the node's claim on the set (after its run ended, any way).</summary>
    public void ReleaseClaim(string setId, string node) =>
        Exec("UPDATE claims SET node=NULL, lease_until=0, run_id=NULL WHERE set_id=@s AND node=@n", ("s", setId), ("n", node));

    /// <summary>The node's heartbeat: records it and renews the leases of every claim it holds. Returns the claims renewed.</summary>
    public int Beat(string node, int processId, long leaseMilliseconds)
    {
        string now = _ledger.NowMilliseconds;
        return _ledger.Use(db =>
        {
            using var tx = db.BeginTransaction();
            Exec(db, tx,
                $"""
                INSERT INTO nodes(node, process_id, started, beat) VALUES(@n, @pid, {now}, {now})
                ON CONFLICT(node) DO UPDATE SET beat={now}, process_id=@pid
                """,
                ("n", node), ("pid", processId));
            int renewed = Exec(db, tx, $"UPDATE claims SET lease_until={now} + @l WHERE node=@n", ("l", leaseMilliseconds), ("n", node));
            tx.Commit();
            return renewed;
        });
    }

    /// <summary>Records a node's start (its start time and process).</summary>
    public void RegisterNode(string node, int processId)
    {
        string now = _ledger.NowMilliseconds;
        Exec($"""
            INSERT INTO nodes(node, process_id, started, beat) VALUES(@n, @pid, {now}, {now})
            ON CONFLICT(node) DO UPDATE SET started={now}, beat={now}, process_id=@pid
            """,
            ("n", node), ("pid", processId));
    }

    /// <summary>Every node that ever beat on this ledger, with the sets it holds claims on now.</summary>
    public IReadOnlyList<NodeRecord> Nodes()
    {
        string now = _ledger.NowMilliseconds;
        var claims = Query("SELECT node, set_id FROM claims WHERE node IS NOT NULL ORDER BY set_id", r => (Node: r.GetString(0), Set: r.GetString(1)));
        return Query($"SELECT node, process_id, started, beat, {now} FROM nodes ORDER BY node",
            r => new NodeRecord(r.GetString(0), (int)L(r, 1), FromMs(L(r, 2)), FromMs(L(r, 3)), FromMs(L(r, 4)),
                claims.Where(c => c.Node == r.GetString(0)).Select(c => c.Set).ToList()));
    }

    private static DateTime FromMs(long ms) => DateTime.UnixEpoch.AddMilliseconds(ms);
}
