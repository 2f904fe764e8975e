namespace Seamwright.Pipeline.State;

/// <summary>Lifecycle of a set in the ledger.</summary>
public static class SetStates
{
    public const string Pending = "pending";
    public const string Running = "running";
    public const string Done = "done";
    public const string Stale = "stale";
    public const string Failed = "failed";
    /// <summary>Its inputs are gone (set folder removed) and its outputs were removed; processed again if it comes back.</summary>
    public const string Retired = "retired";
}

/// <summary>A set as the ledger knows it.</summary>
public sealed record SetRecord(
    string SetId, string State, string Profile, string? Fingerprint, string? Inputs, long? DoneRun, bool Incomplete, string? Reason,
    DateTime FirstSeenUtc, DateTime UpdatedUtc);

/// <summary>A file as the ledger knows it.</summary>
public sealed record FileRecord(string Path, string SetId, long Size, long MtimeTicks, string? Hash, string State, string? Reason, int Analyses, long? LastRun);

/// <summary>Counts of one finished run.</summary>
public sealed record RunSummary(int Images, int BadFiles, int Pairs, int Accepted, int Weak, int Rejected, bool Incomplete);

/// <summary>One run row.</summary>
public sealed record RunRecord(long RunId, string SetId, string State, string Fingerprint, string ToolVersion, DateTime StartedUtc, DateTime? FinishedUtc, RunSummary? Summary)
{
    /// <summary>The node that made the run (null for runs recorded before schema version 2).</summary>
    public string? Node { get; init; }
}

/// <summary>A node sharing the ledger: its last heartbeat (database clock) and the sets it holds claims on.</summary>
public sealed record NodeRecord(string Node, int ProcessId, DateTime StartedUtc, DateTime LastBeatUtc, DateTime DatabaseNowUtc, IReadOnlyList<string> Sets);

/// <summary>What a claim attempt found: claimed (possibly taking over an expired lease), or held by another node.</summary>
public sealed record ClaimAttempt(bool Claimed, string? HeldBy, bool TookOver);

/// <summary>One pair result row.</summary>
public sealed record PairResultRecord(string ImageA, string ImageB, string Status, int Inliers, int Matches, string Reasons);

/// <summary>A recorded failure (bad file or failed set) with its reason.</summary>
public sealed record FailureRecord(long? RunId, string SetId, string Path, string Reason, DateTime AtUtc);

/// <summary>What one run did with one input file.</summary>
/// <param name="Decoded">True when the file was decoded and analysed (a feature-cache miss).</param>
/// <param name="BadReason">Why the file could not be used; null when it was.</param>
public sealed record FileOutcome(string Path, long Size, long MtimeTicks, string? Hash, bool Decoded, string? BadReason);
