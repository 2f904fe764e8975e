namespace Seamwright.Host.Supervision;

/// <summary>How one supervised job ended.</summary>
internal enum JobEnd
{
    /// <summary>Decoded; the reply carries the summary.</summary>
    Done,

    /// <summary>The worker rejected the file with a reason (bad file, worker fine).</summary>
    Rejected,

    /// <summary>The worker died during the job (crash, abort, killed from outside).</summary>
    Crashed,

    /// <summary>The job ran past its wall-clock limit; the worker was killed.</summary>
    TimedOut,

    /// <summary>The worker's working set went over the memory cap; it was killed.</summary>
    OverMemory,
}

/// <summary>The outcome of one job, with the worker's peak working set seen during it.</summary>
internal sealed record JobResult(JobEnd End, string? Reason, WorkerReply? Reply, long PeakWorkingSetBytes)
{
    /// <summary>Ends that count toward quarantine: the file may be what killed the worker.</summary>
    public bool IsStrike => End is JobEnd.Crashed or JobEnd.TimedOut or JobEnd.OverMemory;
}
