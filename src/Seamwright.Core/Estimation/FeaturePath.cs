namespace Seamwright.Core.Estimation;

/// <summary>Which features a pair's estimate was made from.</summary>
public enum FeaturePath
{
    /// <summary>The oriented corners with binary descriptors (the fast path every pair takes first).</summary>
    Corners,

    /// <summary>
    /// Scale-space blobs with gradient-histogram descriptors (Core/Features/ScaleSpace), tried when
    /// the corner path leaves a pair weak, rejected or with few inliers.
    /// </summary>
    ScaleSpace,

    /// <summary>
    /// Scale-space features of simulated tilted views of each image matched against the other's
    /// (Core/Features/ScaleSpace/AffineViews), the last step for pairs both other paths reject.
    /// </summary>
    AffineViews,
}

/// <summary>The words written for a feature path in every output (sidecars, confidence log, report, command output).</summary>
public static class FeaturePathWords
{
    public const string Corners = "corners";
    public const string ScaleSpace = "scale-space";
    public const string AffineViews = "affine-views";

    public static string Word(this FeaturePath path) => path switch
    {
        FeaturePath.ScaleSpace => ScaleSpace,
        FeaturePath.AffineViews => AffineViews,
        _ => Corners,
    };
}
