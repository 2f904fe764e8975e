using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// The true (round-disc) consensus the refinement is judged by: the estimator's own inlier test
/// (<see cref="TransferError.ForwardSquared"/>: ||H(p) - q|| at most the threshold in pixels of
/// the second image, with the point in front, w &gt; 0), so the refiner and its caller always agree.
/// </summary>
internal static class DiscConsensus
{
    public static int Count(ReadOnlySpan<Correspondence> matches, in Transform2D transform, double threshold) =>
        TransferError.Consensus(transform, matches, threshold);

    /// <summary>Squared forward transfer error, +infinity when the point is behind or cannot be mapped.</summary>
    public static double SquaredError(in Correspondence m, in Transform2D transform) => TransferError.ForwardSquared(transform, m);
}
