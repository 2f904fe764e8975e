namespace Seamwright.Core.Estimation;

/// <summary>The family of transforms estimated between two images.</summary>
public enum MotionModel
{
    /// <summary>2 degrees of freedom: shift only (flatbed or stage tiles without rotation).</summary>
    Translation,
    /// <summary>4 degrees of freedom: rotation, uniform scale, shift.</summary>
    Similarity,
    /// <summary>6 degrees of freedom: a linear map plus shift.</summary>
    Affine,
    /// <summary>8 degrees of freedom: full plane projective transform.</summary>
    Homography,
}
