namespace Seamwright.Core.Estimation;

/// <summary>
/// The words written for a pair status in every output (sidecars, tie points, confidence log,
/// ledger, report, command output): defined here once.
/// </summary>
public static class PairStatusWords
{
    public const string Accepted = "accepted";
    public const string Weak = "weak";
    public const string Rejected = "rejected";

    public static string Word(this PairStatus status) => status switch
    {
        PairStatus.Accepted => Accepted,
        PairStatus.Weak => Weak,
        _ => Rejected,
    };
}
