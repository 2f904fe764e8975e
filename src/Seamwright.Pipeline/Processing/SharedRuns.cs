using System.Data.Common;
using Seamwright.Pipeline.Sets;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// A set run when several nodes share the ledger: claim the set first (another node's live claim
/// defers it), skip it when another node finished it meanwhile, release the claim afterwards. A
/// ledger that cannot be reached defers the set too: nothing is published without the ledger.
/// </summary>
internal static class SharedRuns
{
    public static SetOutcome ProcessClaimed(ProcessingContext ctx, SetInputs set, Func<SetOutcome> process)
    {
        try
        {
            var claim = ctx.Store.TryClaim(set.SetId, ctx.NodeName, ctx.LeaseMilliseconds);
            if (!claim.Claimed)
            {
                return Deferred(ctx, set, "claimed by node " + claim.HeldBy);
            }
            try
            {
                if (ctx.IsUpToDate(set))
                {
                    return new SetOutcome(set.SetId, SetOutcomeKind.Unchanged, null, null, "finished by another node");
                }
                return process();
            }
            finally
            {
                try
                {
                    ctx.Store.ReleaseClaim(set.SetId, ctx.NodeName);
                }
                catch (DbException)
                {
                    // The lease runs out by itself.
                }
            }
        }
        catch (DbException e)
        {
            return Deferred(ctx, set, "the shared ledger is unreachable: " + e.Message);
        }
    }

    private static SetOutcome Deferred(ProcessingContext ctx, SetInputs set, string reason)
    {
        var outcome = new SetOutcome(set.SetId, SetOutcomeKind.Deferred, null, null, reason);
        ctx.Observer.SetFinished(outcome);
        return outcome;
    }
}
