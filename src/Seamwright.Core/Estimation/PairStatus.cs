namespace Seamwright.Core.Estimation;

/// <summary>The decision on one image pair.</summary>
public enum PairStatus
{
    /// <summary>Trustworthy: use the link.</summary>
    Accepted,
    /// <summary>Probably right but with a stated doubt (for example a close runner-up model).</summary>
    Weak,
    /// <summary>Not a usable link; the reasons say why.</summary>
    Rejected,
}
