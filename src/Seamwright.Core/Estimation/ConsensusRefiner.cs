using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>Options of the deterministic consensus refinement (see DEVELOPERS.md for the method).</summary>
public sealed record ConsensusRefinerOptions
{
    /// <summary>Sides of the regular polygon inscribed in the threshold disc (at least 8).</summary>
    public int PolygonSides { get; init; } = 8;

    /// <summary>Cap on the number of linear programs per estimate (a work cap, never a time cap).</summary>
    public int MaxLinearPrograms { get; init; } = 200;
}

/// <summary>Outcome of one refinement.</summary>
/// <param name="Transform">The refined model (the initial one when no gain was found).</param>
/// <param name="ConsensusBefore">True round-disc consensus of the initial model.</param>
/// <param name="ConsensusAfter">True round-disc consensus of the returned model (never lower).</param>
/// <param name="LinearPrograms">Linear programs solved.</param>
/// <param name="Termination">Why it stopped, in words.</param>
public sealed record ConsensusRefinement(Transform2D Transform, int ConsensusBefore, int ConsensusAfter, int LinearPrograms, string Termination);

/// <summary>
/// Deterministic consensus maximisation by biconvex programming (Cai, Chin, Le, Suter, ECCV 2018),
/// refining a model found by sampling. Contract: deterministic, and never returns a model with a
/// lower forward-transfer consensus at <c>threshold</c> than <c>initial</c>.
/// </summary>
public static class ConsensusRefiner
{
    public static ConsensusRefinement Refine(
        ReadOnlySpan<Correspondence> matches, Transform2D initial, MotionModel model, double threshold, ConsensusRefinerOptions options)
    {
        // Placeholder until the LP refinement lands: returns the initial model unchanged.
        int c = 0;
        foreach (var m in matches)
        {
            if (initial.W(m.X1, m.Y1) > 0 && initial.TryApply(m.X1, m.Y1, out double u, out double v)
                && (u - m.X2) * (u - m.X2) + (v - m.Y2) * (v - m.Y2) <= threshold * threshold)
            {
                c++;
            }
        }
        _ = model;
        _ = options;
        return new ConsensusRefinement(initial, c, c, 0, "not yet implemented");
    }
}
