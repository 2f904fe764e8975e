using System.Diagnostics;
using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Features;
using Seamwright.Core.Geometry;
using Seamwright.Core.Matching;
using Seamwright.Pipeline.Features;

namespace Seamwright.Pipeline.Pairs;

/// <summary>
/// One pair from features to decision: match at working resolution, estimate in full-resolution
/// coordinates, re-localise the tie points at full resolution from the stored patches, polish
/// again at the requested threshold, decide; a pair this corner path leaves weak, rejected or with
/// few inliers then gets a second look with scale-space features (<see cref="ScaleSpaceLook"/>), and the
/// better of the two decides (<see cref="PairEstimate.FeaturePath"/> says which). Deterministic for the
/// same features and settings.
/// </summary>
public static class PairProcessor
{
    public static PairOutcome Process(ImageFeatures a, ImageFeatures b, PairSettings settings)
    {
        var corners = Corners(a, b, settings);
        if (settings.ScaleSpace is not { } look || !look.Wants(corners.Estimate) || RepeatedPattern(a, b, settings) is not null)
        {
            return corners;
        }
        var best = corners;
        var notes = new List<string>();
        foreach (var path in Paths(look))
        {
            if (path == FeaturePath.AffineViews && best.Estimate.Status != PairStatus.Rejected)
            {
                break; // the last step is only for pairs every other path rejects
            }
            var (outcome, summary) = ScaleSpacePath.Process(a, b, settings, look, path);
            notes.Add(summary);
            if (outcome is not null)
            {
                double total = best.TimingsMs.Total + outcome.TimingsMs.Total;
                var kept = Better(outcome.Estimate, best.Estimate) ? outcome : best;
                best = kept with { TimingsMs = kept.TimingsMs with { Total = total } };
            }
        }
        var e = best.Estimate;
        string first = Inv($"corner path: {corners.Estimate.Status.ToString().ToLowerInvariant()} with {corners.Estimate.Consensus.Final} inliers of {corners.MatchCount} matches");
        return e.FeaturePath == FeaturePath.Corners
            ? best with { Estimate = e with { Terminations = [.. e.Terminations, .. notes.Select(n => n + " (the corner result stands)")] } }
            : best with { Estimate = e with { Terminations = [.. notes, first, .. e.Terminations] } };
    }

    private static IEnumerable<FeaturePath> Paths(ScaleSpaceLook look) =>
        look.AffineViews ? [FeaturePath.ScaleSpace, FeaturePath.AffineViews] : [FeaturePath.ScaleSpace];

    /// <summary>
    /// The scale-space result replaces a rejected corner result when it is not rejected itself, and
    /// any other corner result when its status is at least as good and its final consensus larger: a
    /// corner result made weak by a strong second placement stays weak unless more evidence says otherwise.
    /// </summary>
    private static bool Better(PairEstimate second, PairEstimate first) =>
        first.Status == PairStatus.Rejected
            ? second.Status != PairStatus.Rejected
            : Rank(second.Status) >= Rank(first.Status) && second.Consensus.Final > first.Consensus.Final;

    private static int Rank(PairStatus s) => s switch { PairStatus.Accepted => 2, PairStatus.Weak => 1, _ => 0 };

    /// <summary>The termination of a pair not estimated for too little texture.</summary>
    public const string NoTexture = "not run: too little texture";

    /// <summary>How the repeated-pattern reason begins.</summary>
    public const string RepeatedPatternPrefix = "repeated pattern:";

    /// <summary>The corner path: binary-descriptor matching, estimate, re-localisation and polish.</summary>
    private static PairOutcome Corners(ImageFeatures a, ImageFeatures b, PairSettings settings)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        ArgumentNullException.ThrowIfNull(settings);
        settings.Validate();
        if (a.PatternVersion != b.PatternVersion)
        {
            throw new ArgumentException($"Descriptor patterns differ ({a.PatternVersion} vs {b.PatternVersion}); re-extract the older features.");
        }
        long start = Stopwatch.GetTimestamp();
        var options = settings.Estimation;
        double threshold = options.Threshold;

        string? texture = TextureProblem(a, "A", settings) ?? TextureProblem(b, "B", settings);
        if (texture is not null)
        {
            return Rejected(a, b, settings, 0, 0, [texture], NoTexture, start, 0);
        }

        var result = HammingMatcher.Match(a.Descriptors, b.Descriptors, a.Keypoints, b.Keypoints, settings.Matching);
        double matchingMs = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        if (result.Matches.Length < settings.MinMatches)
        {
            string reason = RepeatedPattern(a, b, settings)
                ?? Inv($"too few distinctive matches ({result.Matches.Length}; at least {settings.MinMatches} needed)");
            return Rejected(a, b, settings, result.Matches.Length, result.AmbiguousCount, [reason], "not run: too few matches", start, matchingMs);
        }

        var pairs = result.Matches;
        var matches = Points(a, b, pairs);
        // Working-resolution corners carry about a working pixel of error: widen the first threshold accordingly.
        double coarse = Math.Max(threshold, 1.5 * Math.Max(a.WorkingScale, b.WorkingScale));
        var estimate = PairEstimator.Estimate(matches, a.FullSize, b.FullSize, options with { Threshold = coarse });
        if (settings.Guided is { } guided && estimate.Status == PairStatus.Accepted)
        {
            (pairs, matches, estimate) = Guide(a, b, pairs, matches, estimate, guided, options with { Threshold = coarse }, 2 * coarse);
        }

        int relocalized = 0;
        double relocalizeMs = 0;
        var final = estimate;
        var ties = matches;
        if (estimate.Transform is { } model)
        {
            long relocStart = Stopwatch.GetTimestamp();
            if (settings.Relocalize)
            {
                ties = (Correspondence[])matches.Clone();
                relocalized = Relocalize(a, b, pairs, ties, model, coarse, settings);
            }
            // A corner matched on two pyramid levels (and re-localised twice onto one anchor pixel) is one
            // tie point: closer than one working pixel of the coarser image in both images is the same correspondence.
            ties = DistinctTies.Distinct(ties, Math.Max(1.0, Math.Max(a.WorkingScale, b.WorkingScale)));
            relocalizeMs = Stopwatch.GetElapsedTime(relocStart).TotalMilliseconds;
            final = PairEstimator.Repolish(ties, estimate, a.FullSize, b.FullSize, options) with { Threshold = threshold };
        }

        if (final.Status != PairStatus.Accepted)
        {
            final = TooRigidModel.Explain(matches, a.FullSize, b.FullSize, options with { Threshold = coarse }, final) ?? WithRepeatedPattern(final, a, b, settings);
        }
        var tiePoints = new Correspondence[final.InlierIndices.Length];
        for (int i = 0; i < tiePoints.Length; i++)
        {
            tiePoints[i] = ties[final.InlierIndices[i]];
        }
        var t = final.TimingsMs;
        return new PairOutcome
        {
            Estimate = final,
            TiePoints = tiePoints,
            FeatureCountA = a.Count,
            FeatureCountB = b.Count,
            MatchCount = matches.Length,
            AmbiguousCount = result.AmbiguousCount,
            RelocalizedCount = relocalized,
            PatternVersion = a.PatternVersion,
            TimingsMs = new PairTimings(matchingMs, t.Sampling, t.Refinement, relocalizeMs, t.Polish,
                Stopwatch.GetElapsedTime(start).TotalMilliseconds),
        };
    }

    private static Correspondence[] Points(ImageFeatures a, ImageFeatures b, FeatureMatch[] pairs)
    {
        var points = new Correspondence[pairs.Length];
        for (int i = 0; i < points.Length; i++)
        {
            var ka = a.Keypoints[pairs[i].IndexA];
            var kb = b.Keypoints[pairs[i].IndexB];
            points[i] = new Correspondence(ka.X, ka.Y, kb.X, kb.Y);
        }
        return points;
    }

    /// <summary>
    /// Matches again with the accepted first estimate as prior (a window of the given radius around each
    /// predicted position) and polishes from that estimate on the new matches; keeps the new set only when
    /// it holds more inliers than the first.
    /// </summary>
    internal static (FeatureMatch[], Correspondence[], PairEstimate) Guide(ImageFeatures a, ImageFeatures b, FeatureMatch[] pairs,
        Correspondence[] matches, PairEstimate first, GuidedMatchOptions guided, EstimationOptions coarse, double radius)
    {
        var model = first.Transform!.Value;
        var again = GuidedMatcher.Match(a.Descriptors, b.Descriptors, a.Keypoints, b.Keypoints, model, guided with { Radius = radius });
        var points = Points(a, b, again);
        var second = PairEstimator.Repolish(points, first, a.FullSize, b.FullSize, coarse);
        return second.Status == PairStatus.Accepted && second.Consensus.Final > first.Consensus.Final
            ? (again, points, second with { Terminations = [.. second.Terminations, Inv($"guided matching: {again.Length} matches against {pairs.Length}")] })
            : (pairs, matches, first);
    }

    /// <summary>Re-localises, in place, every match within twice the threshold of the model; returns how many succeeded.</summary>
    internal static int Relocalize(ImageFeatures a, ImageFeatures b, FeatureMatch[] pairs, Correspondence[] ties, Transform2D model,
        double threshold, PairSettings settings)
    {
        int radius = Math.Min(a.PatchRadius, b.PatchRadius);
        int shift = Math.Max(2, (int)Math.Ceiling(threshold) + 1);
        int template = Math.Clamp(radius - shift - 2, 3, 12);
        shift = Math.Min(shift, radius - template - 1);
        if (shift < 2)
        {
            return 0;
        }
        var options = new RelocalizeOptions { TemplateRadius = template, MaxShift = shift, MinCorrelation = settings.MinCorrelation };
        int count = 0;
        double limit = 4 * threshold * threshold;
        for (int i = 0; i < ties.Length; i++)
        {
            var m = ties[i];
            if (!model.TryApply(m.X1, m.Y1, out double u, out double v) || model.W(m.X1, m.Y1) <= 0
                || (u - m.X2) * (u - m.X2) + (v - m.Y2) * (v - m.Y2) > limit)
            {
                continue;
            }
            if (TiePointRelocalizer.TryRelocalize(a.Patch(pairs[i].IndexA), b.Patch(pairs[i].IndexB), model, options, out var refined, out _))
            {
                ties[i] = refined;
                count++;
            }
        }
        return count;
    }

    /// <summary>The estimate with a repeated-pattern reason first when either image is strongly self-similar.</summary>
    private static PairEstimate WithRepeatedPattern(PairEstimate final, ImageFeatures a, ImageFeatures b, PairSettings settings) =>
        RepeatedPattern(a, b, settings) is { } repeated ? final with { Reasons = [repeated, .. final.Reasons] } : final;

    /// <summary>A reason naming a repeated pattern when either image is strongly self-similar, else null.</summary>
    private static string? RepeatedPattern(ImageFeatures a, ImageFeatures b, PairSettings settings)
    {
        double ra = SelfSimilarity.RepeatedFraction(a.Descriptors, a.Keypoints);
        double rb = SelfSimilarity.RepeatedFraction(b.Descriptors, b.Keypoints);
        double worst = Math.Max(ra, rb);
        return worst >= settings.RepeatedPatternFraction
            ? RepeatedPatternPrefix + Inv($" {100 * worst:0}% of the sampled corners of image {(ra >= rb ? "A" : "B")} have a near-identical twin elsewhere in the same image, so matches are ambiguous")
            : null;
    }

    private static string? TextureProblem(ImageFeatures f, string name, PairSettings settings) =>
        f.Count < settings.MinFeatures
            ? Inv($"too little texture in image {name}: {f.Count} corners above its noise level (at least {settings.MinFeatures} needed)")
            : null;

    private static PairOutcome Rejected(ImageFeatures a, ImageFeatures b, PairSettings settings, int matchCount, int ambiguous,
        string[] reasons, string termination, long start, double matchingMs)
    {
        var o = settings.Estimation;
        double total = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        var estimate = new PairEstimate
        {
            Model = o.Model, Transform = null, MatchCount = matchCount, InlierIndices = [],
            Consensus = new ConsensusFigures(0, 0, 0, 0), Threshold = o.Threshold, Seed = o.Seed,
            Status = PairStatus.Rejected, Reasons = reasons, CornerSigmaPx = double.NaN, RmsResidualPx = double.NaN,
            Iterations = 0, LpCount = 0, Terminations = [termination], TimingsMs = new EstimateTimings(0, 0, 0, 0),
        };
        return new PairOutcome
        {
            Estimate = estimate, TiePoints = [], FeatureCountA = a.Count, FeatureCountB = b.Count, MatchCount = matchCount,
            AmbiguousCount = ambiguous, RelocalizedCount = 0, PatternVersion = a.PatternVersion,
            TimingsMs = new PairTimings(matchingMs, 0, 0, 0, 0, total),
        };
    }

    private static string Inv(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
