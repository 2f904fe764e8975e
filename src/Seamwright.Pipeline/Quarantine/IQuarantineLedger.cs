namespace Seamwright.Pipeline.Quarantine;

/// <summary>
/// Durable record of decode attempts that killed a worker, per file. One entry per path; an
/// entry whose identity no longer matches the file (it changed) is forgotten on the next look.
/// The service's state store implements this over its SQLite database; implementations must
/// be safe to call from several threads.
/// </summary>
public interface IQuarantineLedger
{
    /// <summary>The quarantine entry for this exact file state, or null (also when the file changed since).</summary>
    QuarantineEntry? FindQuarantined(FileIdentity file);

    /// <summary>Marks the file as being decoded now; stays set if the process dies mid-decode.</summary>
    void MarkInProgress(FileIdentity file, DateTimeOffset at);

    /// <summary>Clears the in-progress mark after the attempt ended (any way).</summary>
    void ClearInProgress(FileIdentity file);

    /// <summary>Records a crash, time-out or memory kill on this file state; returns the strikes so far.</summary>
    int AddStrike(FileIdentity file, string reason, DateTimeOffset at);

    /// <summary>Quarantines this file state: it is not decoded again until it changes.</summary>
    void Quarantine(FileIdentity file, string reason, DateTimeOffset at);

    /// <summary>Every file currently quarantined, by path.</summary>
    IReadOnlyList<QuarantineEntry> ListQuarantined();

    /// <summary>Files still marked in progress (left by a process that stopped mid-decode); clears the marks.</summary>
    IReadOnlyList<FileIdentity> TakeInterrupted();
}
