using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Logging.Abstractions;
using Seamwright.Pipeline.Quarantine;

namespace Seamwright.Host.Supervision;

/// <summary>How a supervised decode ended for the caller.</summary>
internal enum DecodeStatus
{
    Decoded,

    /// <summary>The file is bad (reason given); the rest of the set proceeds without it.</summary>
    Rejected,

    /// <summary>The file killed workers too often; not tried again until it changes.</summary>
    Quarantined,
}

internal sealed record DecodeOutcome(DecodeStatus Status, string? Reason, WorkerReply? Reply, int Attempts);

/// <summary>
/// Decodes files in the worker pool with the quarantine rule: the file is marked in progress
/// before each attempt; a crash, time-out or memory kill is a strike against that exact file
/// state and the attempt is repeated; at <see cref="SupervisionOptions.StrikesBeforeQuarantine"/>
/// strikes the file is quarantined and reported, and callers carry on with the other files.
/// </summary>
internal sealed class DecodeSupervisor(WorkerPool pool, IQuarantineLedger ledger, SupervisionOptions options, TimeProvider time, ILogger? logger = null)
{
    private readonly ILogger _logger = logger ?? NullLogger.Instance;
    private long _quarantines;

    public long Quarantines => Interlocked.Read(ref _quarantines);

    public WorkerPool Pool => pool;

    /// <summary>
    /// At start: files a previous process left marked in progress. They are logged and retried,
    /// not counted as strikes: with decoding in workers a stop mid-decode is the service being
    /// stopped or killed, and counting it would quarantine innocent files under a restart loop.
    /// </summary>
    public IReadOnlyList<FileIdentity> RecoverInterrupted()
    {
        var left = ledger.TakeInterrupted();
        foreach (var file in left)
        {
            _logger.LogInformation("Decode of {Path} was interrupted by a stop; it will be retried", file.Path);
        }
        return left;
    }

    /// <summary>Decodes one file; with <paramref name="featureOutputPath"/> the worker writes the features there.</summary>
    public async Task<DecodeOutcome> DecodeAsync(string path, CancellationToken cancellationToken, string? featureOutputPath = null, WorkerJobSpec? spec = null)
    {
        FileIdentity file;
        try
        {
            file = FileIdentity.Of(path);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            return new DecodeOutcome(DecodeStatus.Rejected, "cannot read file: " + ex.Message, null, 0);
        }
        if (ledger.FindQuarantined(file) is { } known)
        {
            return new DecodeOutcome(DecodeStatus.Quarantined, "quarantined: " + known.Reason, null, 0);
        }
        for (int attempt = 1; ; attempt++)
        {
            ledger.MarkInProgress(file, time.GetUtcNow());
            JobResult result;
            try
            {
                result = await pool.RunAsync(path, cancellationToken, featureOutputPath, spec);
            }
            finally
            {
                ledger.ClearInProgress(file);
            }
            if (!result.IsStrike)
            {
                return result.End == JobEnd.Done
                    ? new DecodeOutcome(DecodeStatus.Decoded, null, result.Reply, attempt)
                    : new DecodeOutcome(DecodeStatus.Rejected, result.Reason, result.Reply, attempt);
            }
            int strikes = ledger.AddStrike(file, result.Reason ?? result.End.ToString(), time.GetUtcNow());
            _logger.LogWarning("Worker lost on {Path} ({End}, strike {Strikes} of {Limit}): {Reason}",
                path, result.End, strikes, options.StrikesBeforeQuarantine, result.Reason);
            if (strikes >= options.StrikesBeforeQuarantine)
            {
                string reason = $"{strikes} failed decode attempts, last: {result.Reason}";
                ledger.Quarantine(file, reason, time.GetUtcNow());
                Interlocked.Increment(ref _quarantines);
                _logger.LogError("Quarantined {Path}: {Reason}; it is skipped until the file changes", path, reason);
                return new DecodeOutcome(DecodeStatus.Quarantined, "quarantined: " + reason, null, attempt);
            }
        }
    }
}
