using Seamwright.Core.Estimation;

namespace Seamwright.Pipeline.Processing;

/// <summary>Progress and problems of set processing, reported to the host (logging, progress display).</summary>
public interface IProcessingObserver
{
    void SetStarted(string setId, long runId, int images);

    void ImageDone(string setId, string image, bool fromCache);

    void BadFile(string setId, string image, string reason);

    void PairsPlanned(string setId, int pairs);

    void PairDone(string setId, string imageA, string imageB, PairStatus status, IReadOnlyList<string> reasons);

    /// <summary>After the pairs: how many were estimated and how many came from the pair-result cache.</summary>
    void PairsCounted(string setId, int estimated, int reused) { }

    /// <summary>After the alignment stage: where the set's alignment time went.</summary>
    void AlignmentTimed(string setId, AlignmentTimes times) { }

    /// <summary>After the second look: undecided pairs estimated again with scale-space features (or reused), and how many of them those features decided.</summary>
    void SecondLooks(string setId, int estimated, int reused, int decidedByScaleSpace) { }

    void SetFinished(SetOutcome outcome);
}

/// <summary>An observer that ignores everything.</summary>
public sealed class NullObserver : IProcessingObserver
{
    public static readonly NullObserver Instance = new();

    public void SetStarted(string setId, long runId, int images) { }

    public void ImageDone(string setId, string image, bool fromCache) { }

    public void BadFile(string setId, string image, string reason) { }

    public void PairsPlanned(string setId, int pairs) { }

    public void PairDone(string setId, string imageA, string imageB, PairStatus status, IReadOnlyList<string> reasons) { }

    public void SetFinished(SetOutcome outcome) { }
}

/// <summary>Alignment time of one set, ms: overlap planning's forecasts (in the pairs stage), the set model and alignment, the preview and report.</summary>
public sealed record AlignmentTimes(double OverlapPlanningMs, double AlignMs, double VisualsMs)
{
    /// <summary>Every set-model computation of the set: the forecasts and the final alignment.</summary>
    public double SetModelMs => OverlapPlanningMs + AlignMs;
}

/// <summary>What became of one set.</summary>
public enum SetOutcomeKind
{
    /// <summary>Processed; outputs and manifest written.</summary>
    Done,
    /// <summary>Inputs and settings unchanged since the last finished run: nothing done.</summary>
    Unchanged,
    /// <summary>An input changed while the set was being processed; the run was abandoned and the set waits again.</summary>
    Changed,
    /// <summary>The run failed as a whole (reason given); the set is recorded as failed.</summary>
    Failed,
    /// <summary>Not this node's now: another node holds the set's claim, this node lost its lease, or the shared ledger is unreachable. Look again later.</summary>
    Deferred,
}

public sealed record SetOutcome(string SetId, SetOutcomeKind Kind, long? RunId, State.RunSummary? Summary, string? Reason);
