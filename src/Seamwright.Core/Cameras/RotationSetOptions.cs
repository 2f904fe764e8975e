namespace Seamwright.Core.Cameras;

/// <summary>Radial distortion terms estimated per camera.</summary>
public enum DistortionTerms
{
    /// <summary>No distortion (k1 = k2 = 0).</summary>
    None,

    /// <summary>k1 only.</summary>
    K1,

    /// <summary>k1 and k2.</summary>
    K1K2,

    /// <summary>k1 when it explains the tie points better than no distortion (<see cref="DistortionChoice"/>), else none.</summary>
    Auto,
}

/// <summary>Settings of the camera-rotation set model. Defaults are common practice unless a source is named.</summary>
public sealed record RotationSetOptions
{
    /// <summary>One focal length per image instead of one per camera.</summary>
    public bool FocalPerImage { get; init; }

    /// <summary>Radial distortion terms estimated per camera (default <see cref="DistortionTerms.Auto"/>).</summary>
    public DistortionTerms Distortion { get; init; } = DistortionTerms.Auto;

    /// <summary>Scale of the Cauchy loss in pixels (as the planar joint refinement).</summary>
    public double RobustScalePx { get; init; } = 2;

    /// <summary>A link whose median tie-point residual under the joint solution exceeds this is left out and the set solved again.</summary>
    public double LinkResidualLimitPx { get; init; } = 5;

    /// <summary>Work cap on Levenberg-Marquardt iterations per solve.</summary>
    public int MaxIterations { get; init; } = 100;

    /// <summary>Rounds of solve, re-check, leave out the worst link (one per round).</summary>
    public int MaxRounds { get; init; } = 6;

    /// <summary>Tie points used per link (an even subsample when a link has more).</summary>
    public int MaxTiePointsPerLink { get; init; } = 200;

    /// <summary>Index of the reference image; null picks the most connected.</summary>
    public int? ReferenceImage { get; init; }

    /// <summary>Level the set after solving (Brown and Lowe, IJCV 2007, section 5.1).</summary>
    public bool Level { get; init; } = true;

    /// <summary>Throws with the setting's name and allowed range when a value is out of range.</summary>
    public void Validate()
    {
        Check(RobustScalePx > 0, nameof(RobustScalePx), "> 0");
        Check(LinkResidualLimitPx > 0, nameof(LinkResidualLimitPx), "> 0");
        Check(MaxIterations >= 1, nameof(MaxIterations), ">= 1");
        Check(MaxRounds >= 1, nameof(MaxRounds), ">= 1");
        Check(MaxTiePointsPerLink >= 4, nameof(MaxTiePointsPerLink), ">= 4");
    }

    private static void Check(bool ok, string name, string range)
    {
        if (!ok)
        {
            throw new ArgumentOutOfRangeException(name, $"Rotation set setting {name} must be {range}.");
        }
    }
}
