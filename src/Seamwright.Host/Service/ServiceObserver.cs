using Seamwright.Core.Estimation;
using Seamwright.Host.Terminal;
using Seamwright.Pipeline.Processing;
using Serilog;

namespace Seamwright.Host.Service;

/// <summary>Logs set processing in the service (structured events).</summary>
internal sealed class ServiceObserver(ILogger log, Operations.OperationsMetrics? metrics = null) : IProcessingObserver
{
    public void SetStarted(string setId, long runId, int images) =>
        log.Information("Set {Set}: run {Run} started with {Images} images", setId, runId, images);

    public void ImageDone(string setId, string image, bool fromCache) =>
        log.Debug("Set {Set}: image {Image} analysed (from cache: {FromCache})", setId, image, fromCache);

    public void BadFile(string setId, string image, string reason) =>
        log.Warning("Set {Set}: bad file {Image}: {Reason}", setId, image, reason);

    public void PairsPlanned(string setId, int pairs) =>
        log.Debug("Set {Set}: {Pairs} pairs planned", setId, pairs);

    public void PairDone(string setId, string imageA, string imageB, PairStatus status, IReadOnlyList<string> reasons)
    {
        metrics?.RecordPair(status);
        log.Debug("Set {Set}: pair {A} / {B}: {Status} ({Reasons})", setId, imageA, imageB, status, string.Join("; ", reasons));
    }

    public void SecondLooks(string setId, int estimated, int reused, int decidedByScaleSpace) =>
        log.Information("Set {Set}: second look with scale-space features for {Pairs} undecided pairs ({Reused} reused); {Decided} decided by them",
            setId, estimated + reused, reused, decidedByScaleSpace);

    public void SetFinished(SetOutcome outcome)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        metrics?.RecordSet(outcome.Kind.ToString().ToLowerInvariant());
        if (outcome.Kind == SetOutcomeKind.Done)
        {
            log.Information("Set {Set}: {Outcome} [run {Run}, images {Images}, pairs {Pairs}, accepted {Accepted}, weak {Weak}, rejected {Rejected}, bad {BadFiles}]",
                outcome.SetId, RunProgress.Describe(outcome), outcome.RunId, outcome.Summary?.Images, outcome.Summary?.Pairs,
                outcome.Summary?.Accepted, outcome.Summary?.Weak, outcome.Summary?.Rejected, outcome.Summary?.BadFiles);
        }
        else
        {
            log.Warning("Set {Set}: {Outcome}", outcome.SetId, RunProgress.Describe(outcome));
        }
    }
}
