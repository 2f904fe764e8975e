namespace Seamwright.Core.Alignment;

/// <summary>Settings of the set alignment. Defaults are common practice unless a source is named.</summary>
public sealed record AlignmentOptions
{
    /// <summary>Use weak links as well as accepted ones (default false: accepted only).</summary>
    public bool IncludeWeakLinks { get; init; }

    /// <summary>Index of the image to use as reference; null picks the most connected image.</summary>
    public int? ReferenceImage { get; init; }

    /// <summary>Closure tolerance of a 3-link cycle in pixels (floor); grows with sqrt(length / 3).</summary>
    public double CycleTolerancePx { get; init; } = 4;

    /// <summary>Closure tolerance of a 3-link cycle as a fraction of the start image's diagonal (the larger of the two applies).</summary>
    public double CycleToleranceFraction { get; init; } = 0.01;

    /// <summary>Longest cycle (in links) enumerated for the consistency check.</summary>
    public int MaxCycleLength { get; init; } = 6;

    /// <summary>Work cap on cycles examined (never a time cap, so results do not depend on load).</summary>
    public int MaxCycles { get; init; } = 20000;

    /// <summary>
    /// Scale of the Cauchy loss in pixels: residuals well above it lose influence. With
    /// <see cref="AdaptRobustScale"/> the widest scale: the first pass uses it, the second the scale
    /// matched to the tie points' noise, never above it.
    /// </summary>
    public double RobustScalePx { get; init; } = 2;

    /// <summary>
    /// Refine a second time with the Cauchy scale matched to the tie points' noise under the first
    /// solution (default true; see <see cref="JointRefiner"/>); false keeps the fixed scale.
    /// </summary>
    public bool AdaptRobustScale { get; init; } = true;

    /// <summary>Smallest matched Cauchy scale, px: below a few hundredths of a pixel tie points are not localised (judgement).</summary>
    public double MinRobustScalePx { get; init; } = 0.05;

    /// <summary>A link whose median tie-point residual under the joint solution exceeds this is demoted.</summary>
    public double LinkResidualLimitPx { get; init; } = 5;

    /// <summary>Refine all transforms jointly (default); false keeps the spanning-tree chaining (for comparison).</summary>
    public bool JointRefinement { get; init; } = true;

    /// <summary>Work cap on Levenberg-Marquardt iterations.</summary>
    public int MaxIterations { get; init; } = 60;

    /// <summary>Tie points used per link (an even subsample when a link has more).</summary>
    public int MaxTiePointsPerLink { get; init; } = 200;

    /// <summary>
    /// Smallest allowed ratio of the projective depth w at an image corner to w at the image's
    /// tie-point centroid; below it the corner is near or beyond the horizon of the reference plane.
    /// </summary>
    public double MinDepthRatio { get; init; } = 0.2;

    /// <summary>Largest allowed change of an image's area (either way) when mapped into the reference.</summary>
    public double MaxAreaRatio { get; init; } = 25;

    /// <summary>Rounds of refine, re-check, demote.</summary>
    public int MaxRounds { get; init; } = 3;

    /// <summary>Throws with the setting's name and allowed range when a value is out of range.</summary>
    public void Validate()
    {
        Check(CycleTolerancePx > 0, nameof(CycleTolerancePx), "> 0");
        Check(CycleToleranceFraction >= 0 && CycleToleranceFraction < 1, nameof(CycleToleranceFraction), "[0, 1)");
        Check(MaxCycleLength >= 3 && MaxCycleLength <= 12, nameof(MaxCycleLength), "3..12");
        Check(MaxCycles >= 0, nameof(MaxCycles), ">= 0");
        Check(RobustScalePx > 0, nameof(RobustScalePx), "> 0");
        Check(MinRobustScalePx > 0, nameof(MinRobustScalePx), "> 0");
        Check(LinkResidualLimitPx > 0, nameof(LinkResidualLimitPx), "> 0");
        Check(MaxIterations >= 1, nameof(MaxIterations), ">= 1");
        Check(MaxTiePointsPerLink >= 4, nameof(MaxTiePointsPerLink), ">= 4");
        Check(MinDepthRatio > 0 && MinDepthRatio < 1, nameof(MinDepthRatio), "(0, 1)");
        Check(MaxAreaRatio > 1, nameof(MaxAreaRatio), "> 1");
        Check(MaxRounds >= 1, nameof(MaxRounds), ">= 1");
    }

    private static void Check(bool ok, string name, string range)
    {
        if (!ok)
        {
            throw new ArgumentOutOfRangeException(name, $"Alignment setting {name} must be {range}.");
        }
    }
}
