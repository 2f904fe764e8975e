using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>Options of the exact maximum-consensus solver (a mixed-integer program; small problems only).</summary>
public sealed record ExactMaxConsensusOptions
{
    /// <summary>Sides of the polygon inscribed in the threshold disc (at least 8), as in the refinement.</summary>
    public int PolygonSides { get; init; } = 8;

    /// <summary>Lower bound on w at counted data in Hartley-normalised coordinates, as in the refinement.</summary>
    public double Tau { get; init; } = 1e-3;

    /// <summary>
    /// Box on every parameter of the normalised model (|h_j| &lt;= bound), which makes the big-M
    /// constants finite. The optimum is exact within this box; 10 holds every realistic
    /// overlap (a normalised identity has entries 1 and 0), and a tighter box solves faster.
    /// </summary>
    public double ParameterBound { get; init; } = 10;

    /// <summary>Cap on branch-and-bound nodes (a work cap, never a time cap); beyond it the result is the best found, not proven.</summary>
    public long MaxNodes { get; init; } = 200_000;

    /// <summary>Refuse problems larger than this (the solve time grows steeply with the match count).</summary>
    public int MaxMatches { get; init; } = 60;
}

/// <summary>Outcome of the exact solver.</summary>
/// <param name="Transform">The optimal model found (pixels, first image to second); null when the solver found none.</param>
/// <param name="PolygonConsensus">Data inside the inscribed polygon with w &gt;= tau: the quantity maximised.</param>
/// <param name="DiscConsensus">True round-disc consensus of <paramref name="Transform"/> (at least the polygon count up to round-off).</param>
/// <param name="ProvenOptimal">True when the solver proved that no model in the box has a larger polygon consensus.</param>
/// <param name="UpperBound">Proven upper bound on the polygon consensus in the box.</param>
/// <param name="Nodes">Branch-and-bound nodes explored.</param>
public sealed record ExactMaxConsensusResult(Transform2D? Transform, int PolygonConsensus, int DiscConsensus, bool ProvenOptimal, int UpperBound, long Nodes);
