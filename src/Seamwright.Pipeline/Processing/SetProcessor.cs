using System.Runtime.ExceptionServices;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Processes one set from its input files to its outputs, as four stages (docs/ARCHITECTURE.md):
/// <list type="number">
/// <item><see cref="ImageStage"/>: hash, feature cache, analyse; bad files recorded; inputs re-checked.</item>
/// <item><see cref="PairStage"/>: plan, estimate, review.</item>
/// <item><see cref="AlignmentStep"/>: reference frame, preview, report.</item>
/// <item><see cref="SetPublisher"/>: documents, atomic writes, manifest last, removal of unlisted files, ledger.</item>
/// </list>
/// Inputs are only ever opened for reading. A run whose inputs change is abandoned (the set waits
/// again); a failure is recorded and the set marked failed; cancellation abandons the run.
/// </summary>
public sealed class SetProcessor(ProcessingContext ctx)
{
    private readonly ImageStage _images = new(ctx);
    private readonly PairStage _pairs = new(ctx);
    private readonly AlignmentStep _alignment = new(ctx);
    private readonly SetPublisher _publisher = new(ctx);

    public SetOutcome Process(SetInputs set, bool incomplete, CancellationToken cancel)
    {
        ArgumentNullException.ThrowIfNull(set);
        return ctx.Store.IsShared ? SharedRuns.ProcessClaimed(ctx, set, () => ProcessOwned(set, incomplete, cancel)) : ProcessOwned(set, incomplete, cancel);
    }

    private SetOutcome ProcessOwned(SetInputs set, bool incomplete, CancellationToken cancel)
    {
        var run = Begin(set, incomplete);
        try
        {
            var outcome = Unwrapped(() => Stages(run, cancel));
            ctx.Observer.SetFinished(outcome);
            return outcome;
        }
        catch (LeaseLostException e)
        {
            // The set is the claim holder's now: only this run is ended, the set's state is left to it.
            ctx.Store.AbandonRunOnly(run.RunId);
            return Finished(new SetOutcome(set.SetId, SetOutcomeKind.Deferred, run.RunId, null, e.Message));
        }
        catch (System.Data.Common.DbException) when (ctx.Store.IsShared)
        {
            throw; // the shared ledger is unreachable: SharedRuns defers the set (recording anything would fail too)
        }
        catch (InputsChangedException e)
        {
            ctx.Store.AbandonRun(run.RunId, set.SetId, SetStates.Pending, set.Profile, e.Message);
            return Finished(new SetOutcome(set.SetId, SetOutcomeKind.Changed, run.RunId, null, e.Message));
        }
        catch (OperationCanceledException)
        {
            ctx.Store.AbandonRun(run.RunId, set.SetId, SetStates.Pending, set.Profile, "interrupted by shutdown");
            throw;
        }
        catch (Exception e) when (e is not OperationCanceledException)
        {
            string reason = e.GetType().Name + ": " + e.Message;
            ctx.Store.AbandonRun(run.RunId, set.SetId, SetStates.Failed, set.Profile, reason);
            ctx.Store.RecordFailure(run.RunId, set.SetId, set.SetId, reason);
            return Finished(new SetOutcome(set.SetId, SetOutcomeKind.Failed, run.RunId, null, reason));
        }
    }

    /// <summary>The stages in order; each reads the run and the previous stages' results.</summary>
    private SetOutcome Stages(SetRun run, CancellationToken cancel)
    {
        var images = _images.Run(run, cancel);
        var pairs = _pairs.Run(run, images, cancel);
        var writtenUtc = DateTime.UtcNow; // recorded (manifest, confidence log, report), never compared
        var aligned = _alignment.Run(run, images, pairs, writtenUtc);
        return _publisher.Publish(run, images, pairs, aligned, writtenUtc);
    }

    /// <summary>Resolves the run plan once (the settings as they are now) and opens the run in the ledger.</summary>
    private SetRun Begin(SetInputs set, bool incomplete)
    {
        var plan = ctx.PlanFor(set.Profile);
        long runId = ctx.Store.BeginRun(set.SetId, set.Profile, plan.Fingerprint, ProcessingContext.ToolVersion, ctx.NodeName);
        ctx.Observer.SetStarted(set.SetId, runId, set.Files.Count);
        return new SetRun(set, runId, plan, incomplete);
    }

    private SetOutcome Finished(SetOutcome outcome)
    {
        ctx.Observer.SetFinished(outcome);
        return outcome;
    }

    /// <summary>Parallel loops wrap the body's exception; surface the first one as if thrown directly.</summary>
    private static T Unwrapped<T>(Func<T> body)
    {
        try
        {
            return body();
        }
        catch (AggregateException ae)
        {
            var inner = ae.Flatten().InnerExceptions;
            var first = inner.FirstOrDefault(x => x is InputsChangedException or OperationCanceledException) ?? inner[0];
            ExceptionDispatchInfo.Capture(first).Throw();
            throw;
        }
    }
}
