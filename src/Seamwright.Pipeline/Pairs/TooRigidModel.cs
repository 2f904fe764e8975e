using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Pipeline.Pairs;

/// <summary>
/// The diagnosis of a pair that failed because the profile forces a motion model with fewer
/// degrees of freedom than a homography (translation, similarity, affine) on views that differ by
/// perspective: the same matches are estimated once more as a homography (same seed and
/// threshold); when that is accepted with clearly more inliers than the forced model kept, the
/// reason says so, with the residual the forced model leaves when fitted by least squares to the
/// homography's inliers. Called only for pairs that are not accepted, so accepted pairs and their
/// outputs never change.
/// </summary>
public static class TooRigidModel
{
    /// <summary>A homography counts as clearly better with at least this many times the forced model's inliers.</summary>
    public const double InlierFactor = 1.5;

    /// <summary>The reason in words, or null when the forced model is a homography or is not what failed the pair.</summary>
    public static string? Diagnose(ReadOnlySpan<Correspondence> matches, ImageSize sizeA, ImageSize sizeB, EstimationOptions options, PairEstimate forced)
    {
        ArgumentNullException.ThrowIfNull(options);
        ArgumentNullException.ThrowIfNull(forced);
        var family = MotionFamily.Of(options.Model);
        var homography = MotionFamily.Homography;
        if (forced.Status == PairStatus.Accepted || family.ParameterCount >= homography.ParameterCount)
        {
            return null;
        }
        var free = PairEstimator.Estimate(matches, sizeA, sizeB, options with { Model = homography.Model });
        int kept = forced.InlierIndices.Length;
        if (free.Status != PairStatus.Accepted || free.InlierIndices.Length < InlierFactor * Math.Max(kept, 1))
        {
            return null;
        }
        var inliers = new Correspondence[free.InlierIndices.Length];
        for (int i = 0; i < inliers.Length; i++)
        {
            inliers[i] = matches[free.InlierIndices[i]];
        }
        string residual = family.TrySolveLeastSquares(inliers, out var rigid) && rigid.IsFinite
            ? string.Create(CultureInfo.InvariantCulture, $"leaves {RmsTransferError(rigid, inliers):0.0} px RMS residual on them")
            : "cannot be fitted to them";
        return string.Create(CultureInfo.InvariantCulture,
            $"too rigid a motion model: a homography fits {free.InlierIndices.Length} of the {matches.Length} matches within {options.Threshold:0.##} px, while the forced {family.Name} model ({family.ParameterCount} degrees of freedom) kept {kept} and {residual}; the views differ by perspective (a tilted or turned camera), so set Estimation:MotionModel to {homography.Name} for this profile");
    }

    /// <summary>
    /// The estimate with the diagnosis as its first reason, and without the remark that a second
    /// placement suggests a repeated pattern (under a too-rigid model, the second placement is the
    /// other part of the same perspective overlap); null when <see cref="Diagnose"/> finds nothing.
    /// </summary>
    public static PairEstimate? Explain(ReadOnlySpan<Correspondence> matches, ImageSize sizeA, ImageSize sizeB, EstimationOptions options, PairEstimate forced)
    {
        ArgumentNullException.ThrowIfNull(forced);
        return Diagnose(matches, sizeA, sizeB, options, forced) is { } why
            ? forced with { Reasons = [why, .. forced.Reasons.Where(r => !r.StartsWith(SecondPlacement, StringComparison.Ordinal))] }
            : null;
    }

    /// <summary>How <c>Core/Quality/PairDecision.cs</c> starts its remark on a distinct second placement.</summary>
    internal const string SecondPlacement = "a distinct second placement is supported by";

    private static double RmsTransferError(in Transform2D t, ReadOnlySpan<Correspondence> ties)
    {
        double sum = 0;
        foreach (var c in ties)
        {
            var (u, v) = t.Apply(c.X1, c.Y1);
            sum += (u - c.X2) * (u - c.X2) + (v - c.Y2) * (v - c.Y2);
        }
        return Math.Sqrt(sum / ties.Length);
    }
}
