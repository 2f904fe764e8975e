using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Quality;

/// <summary>What the decision looks at, all computed from the estimate alone.</summary>
/// <param name="Model">Motion model family.</param>
/// <param name="Transform">Final transform, null when none was found.</param>
/// <param name="MatchCount">Tentative matches.</param>
/// <param name="OverlapMatchCount">Matches whose first point maps inside the second image (Brown and Lowe's n_f).</param>
/// <param name="Consensus">Final inliers.</param>
/// <param name="RunnerUpConsensus">Consensus of the best distinct runner-up among the other matches (0 when none).</param>
/// <param name="CornerSigmaPx">Corner standard deviation from the fit covariance (NaN when unknown).</param>
/// <param name="Threshold">Inlier threshold, px.</param>
/// <param name="SanityProblem">The first failed sanity check, or null.</param>
public sealed record PairEvidence(
    MotionModel Model, Transform2D? Transform, int MatchCount, int OverlapMatchCount, int Consensus,
    int RunnerUpConsensus, double CornerSigmaPx, double Threshold, string? SanityProblem);

/// <summary>The decision and its reasons in words.</summary>
public sealed record PairVerdict(PairStatus Status, string[] Reasons);

/// <summary>
/// Accepted / weak / rejected with reasons (docs/DESIGN.md stage 9). Rejected: no model, a failed
/// sanity check, or fewer than minimum + 4 inliers. Weak: few inliers, a low inlier ratio, a close
/// runner-up (repeated patterns) or a large corner uncertainty. Brown and Lowe's verification is
/// reported as a remark only: its constants assume a tenth of false matches agree with a wrong
/// model by chance (SIFT between photos), far above uniform outliers, where it would reject clear
/// results (e.g. 400 of 2000 matches).
/// </summary>
public static class PairDecision
{
    public static PairVerdict Decide(PairEvidence e, DecisionOptions options)
    {
        ArgumentNullException.ThrowIfNull(e);
        ArgumentNullException.ThrowIfNull(options);
        var rejected = new List<string>();
        var weak = new List<string>();
        var remarks = new List<string>();
        var family = MotionFamily.Of(e.Model);
        int s = family.MinimalSampleSize;
        string name = family.Name;

        if (e.Transform is null)
        {
            return new PairVerdict(PairStatus.Rejected, [$"no {name} model could be estimated from the matches"]);
        }
        if (e.SanityProblem is not null)
        {
            rejected.Add("implausible transform: " + e.SanityProblem);
        }
        int minimum = s + options.MinInliersAboveMinimal;
        if (e.Consensus < minimum)
        {
            rejected.Add(Inv($"only {Math.Max(e.Consensus, 0)} inliers; a {name} needs at least {minimum} to be checked"));
        }
        else if (e.Consensus < options.ConfidentInliers)
        {
            weak.Add(Inv($"few inliers ({e.Consensus} < {options.ConfidentInliers})"));
        }
        double ratio = e.MatchCount > 0 ? (double)Math.Max(e.Consensus, 0) / e.MatchCount : 0;
        if (e.Consensus >= minimum && ratio < options.MinInlierRatio)
        {
            weak.Add(Inv($"low inlier ratio {ratio:0.###} (< {options.MinInlierRatio})"));
        }
        if (e.Consensus >= minimum && e.RunnerUpConsensus >= minimum &&
            e.RunnerUpConsensus - s >= options.RunnerUpCloseRatio * (e.Consensus - s))
        {
            weak.Add(Inv($"a distinct second placement is supported by {e.RunnerUpConsensus} other matches against {e.Consensus} (repeated pattern or a second plane?)"));
        }
        if (e.Consensus >= minimum && double.IsFinite(e.CornerSigmaPx) && e.CornerSigmaPx > options.MaxCornerSigmaThresholds * e.Threshold)
        {
            weak.Add(Inv($"corner uncertainty {e.CornerSigmaPx:0.##} px exceeds {options.MaxCornerSigmaThresholds} thresholds"));
        }
        else if (e.Consensus >= minimum && double.IsPositiveInfinity(e.CornerSigmaPx))
        {
            weak.Add("corner uncertainty unbounded (a corner maps to infinity)");
        }
        if (e.Consensus >= 0 && !(e.Consensus > options.BrownLoweAlpha + options.BrownLoweBeta * e.OverlapMatchCount))
        {
            remarks.Add(Inv($"remark: Brown and Lowe's verification not met ({Math.Max(e.Consensus, 0)} <= {options.BrownLoweAlpha} + {options.BrownLoweBeta} x {e.OverlapMatchCount} matches in the overlap)"));
        }
        var status = rejected.Count > 0 ? PairStatus.Rejected : weak.Count > 0 ? PairStatus.Weak : PairStatus.Accepted;
        return new PairVerdict(status, [.. rejected, .. weak, .. remarks]);
    }

    private static string Inv(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
