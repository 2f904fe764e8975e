using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>Result of the final polish.</summary>
/// <param name="Transform">The polished transform.</param>
/// <param name="InlierIndices">Ascending indices of the matches within the threshold of it.</param>
/// <param name="CornerSigmaPx">See <see cref="LeastSquaresFit.CornerSigmaPx"/>; NaN when not computed.</param>
/// <param name="RmsResidualPx">Root mean square forward transfer error over the inliers.</param>
/// <param name="Rounds">Fit-and-reselect rounds run.</param>
/// <param name="Termination">Why it stopped, in words.</param>
public sealed record PolishResult(Transform2D Transform, int[] InlierIndices, double CornerSigmaPx, double RmsResidualPx, int Rounds, string Termination)
{
    public int Consensus => InlierIndices.Length;
}

/// <summary>
/// Final polish (docs/DESIGN.md stage 8): Levenberg-Marquardt on the forward transfer error of the
/// consensus set, re-select the inliers at the threshold with the same forward test the
/// refiner counts, repeat until the set is stable or the round cap is reached.
/// Least squares over a fixed inlier set ignores the threshold: it recentres the model on the
/// bulk of the inliers and pushes border data out, giving back consensus the refinement won
/// (measured on the homogr set, docs/notes/estimator.md: that border data is also what makes a
/// maximum-consensus model less accurate). The stated rule: a step is taken only when the
/// consensus stays at or above a floor, the starting consensus less floor(tolerance x start);
/// a step below it is shortened (the transform moved 1/2, 1/4, 1/8 of the way, blended on the
/// h33 = 1 matrices) and, when no shortened step holds the floor, the polish stops there.
/// </summary>
internal static class FinalPolish
{
    private static readonly double[] StepFractions = [0.5, 0.25, 0.125];

    public static PolishResult Run(MotionModel model, ReadOnlySpan<Correspondence> matches, Transform2D initial, ImageSize sizeA, double threshold, int maxRounds, double tolerance)
    {
        int minimal = MotionFamily.Of(model).MinimalSampleSize;
        var current = initial;
        var inliers = TransferError.InlierIndices(current, matches, threshold);
        int floor = Math.Max(minimal, inliers.Length - (int)Math.Floor(tolerance * inliers.Length));
        double sigma = double.NaN;
        int rounds = 0;
        string termination;
        if (inliers.Length < minimal)
        {
            termination = "too few inliers to polish";
        }
        else
        {
            termination = maxRounds == 0 ? "polish off" : $"inlier set not stable after {maxRounds} rounds";
            var subset = new Correspondence[matches.Length];
            while (rounds < maxRounds)
            {
                rounds++;
                for (int i = 0; i < inliers.Length; i++)
                {
                    subset[i] = matches[inliers[i]];
                }
                // Corner uncertainty over the overlap (the inliers' box), where a stitch uses the model.
                var corners = OverlapRegion.Corners(matches, inliers, sizeA);
                var fit = LevenbergMarquardtFit.Fit(model, subset.AsSpan(0, inliers.Length), current, corners);
                // The covariance of the least-squares fit over the current set stands for the
                // polished model's even when the step is shortened (the same data decide both).
                if (fit.Transform.IsFinite)
                {
                    sigma = fit.CornerSigmaPx;
                }
                var candidate = fit.Transform;
                var reselected = candidate.IsFinite ? TransferError.InlierIndices(candidate, matches, threshold) : [];
                string? shortened = null;
                if (reselected.Length < floor)
                {
                    shortened = "";
                    reselected = [];
                    foreach (double f in StepFractions)
                    {
                        var blend = Blend(current, fit.Transform, f);
                        var kept = blend.IsFinite ? TransferError.InlierIndices(blend, matches, threshold) : [];
                        if (kept.Length >= floor)
                        {
                            candidate = blend;
                            reselected = kept;
                            shortened = $" (step shortened to {f.ToString(System.Globalization.CultureInfo.InvariantCulture)})";
                            break;
                        }
                    }
                    if (reselected.Length == 0)
                    {
                        termination = $"a least-squares step would lose consensus; stopped after {rounds} round{(rounds == 1 ? "" : "s")}";
                        break;
                    }
                }
                current = candidate;
                if (reselected.AsSpan().SequenceEqual(inliers))
                {
                    termination = $"inlier set stable after {rounds} round{(rounds == 1 ? "" : "s")}{shortened}";
                    break;
                }
                inliers = reselected;
            }
        }
        double sum = 0;
        foreach (int i in inliers)
        {
            sum += TransferError.ForwardSquared(current, matches[i]);
        }
        double rms = inliers.Length > 0 ? Math.Sqrt(sum / inliers.Length) : double.NaN;
        return new PolishResult(current, inliers, sigma, rms, rounds, termination);
    }

    /// <summary>(1 - f) a + f b on the h33 = 1 matrices.</summary>
    private static Transform2D Blend(in Transform2D a, in Transform2D b, double f)
    {
        var x = a.Normalized();
        var y = b.Normalized();
        double g = 1 - f;
        return new Transform2D(
            g * x.M11 + f * y.M11, g * x.M12 + f * y.M12, g * x.M13 + f * y.M13,
            g * x.M21 + f * y.M21, g * x.M22 + f * y.M22, g * x.M23 + f * y.M23,
            g * x.M31 + f * y.M31, g * x.M32 + f * y.M32, 1);
    }
}
