namespace Seamwright.Core.Estimation;

/// <summary>
/// The quality of a model: its consensus (inliers at the threshold) first, then the truncated
/// quadratic cost of MSAC (Torr and Zisserman, CVIU 2000) to break ties between equal counts.
/// </summary>
public readonly record struct ConsensusScore(int Inliers, double TruncatedCost)
{
    public static ConsensusScore None => new(-1, double.PositiveInfinity);

    public bool IsBetterThan(in ConsensusScore other) =>
        Inliers > other.Inliers || (Inliers == other.Inliers && TruncatedCost < other.TruncatedCost);
}
