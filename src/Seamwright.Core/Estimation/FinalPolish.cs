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
/// Final polish (DESIGN.md stage 8): Levenberg-Marquardt on the forward transfer error of the
/// consensus set, re-select the inliers at the threshold, repeat until the set is stable or the
/// round cap is reached.
/// </summary>
internal static class FinalPolish
{
    public static PolishResult Run(MotionModel model, ReadOnlySpan<Correspondence> matches, Transform2D initial, ImageSize sizeA, double threshold, int maxRounds)
    {
        var corners = Transform2D.Corners(sizeA.Width, sizeA.Height);
        int minimal = Quality.PairDecision.MinimalSize(model);
        var current = initial;
        var inliers = TransferError.InlierIndices(current, matches, threshold);
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
                var fit = LevenbergMarquardtFit.Fit(model, subset.AsSpan(0, inliers.Length), current, corners);
                var reselected = TransferError.InlierIndices(fit.Transform, matches, threshold);
                if (!fit.Transform.IsFinite || reselected.Length < minimal)
                {
                    termination = "the fit lost its inliers; kept the previous model";
                    break;
                }
                current = fit.Transform;
                sigma = fit.CornerSigmaPx;
                if (reselected.AsSpan().SequenceEqual(inliers))
                {
                    termination = $"inlier set stable after {rounds} round{(rounds == 1 ? "" : "s")}";
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
}
