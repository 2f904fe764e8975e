using System.Diagnostics;
using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Features.ScaleSpace;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Core.Matching;
using Seamwright.Pipeline.Features;

namespace Seamwright.Pipeline.Pairs;

/// <summary>
/// The scale-space paths of one pair: scale-space features of both compact copies (computed once per
/// image and kept with its features), histogram matching, the same estimator as the corner path in
/// full-resolution coordinates. The affine-view path matches the pooled features of each image's
/// simulated tilted views against the other image's plain scale-space features, both ways, and
/// drops repeats. There are no full-resolution patches for these points, so tie points keep the
/// compact copy's precision: the final threshold is at least one compact pixel.
/// </summary>
internal static class ScaleSpacePath
{
    /// <summary>
    /// The outcome from scale-space features (null when either image has no compact copy or there are
    /// too few matches to estimate) and a line saying what the path found.
    /// </summary>
    public static (PairOutcome? Outcome, string Summary) Process(ImageFeatures a, ImageFeatures b, PairSettings settings, ScaleSpaceLook look,
        FeaturePath path = FeaturePath.ScaleSpace)
    {
        long start = Stopwatch.GetTimestamp();
        string name = path == FeaturePath.AffineViews ? "affine-view path" : "scale-space path";
        var fa = a.ScaleSpace(look.Detector);
        var fb = b.ScaleSpace(look.Detector);
        if (fa is null || fb is null)
        {
            return (null, name + ": not available (features cached without a compact copy)");
        }
        double compactScale = Math.Max(a.Compact!.Scale, b.Compact!.Scale);
        Correspondence[] matches;
        int countA = fa.Count, countB = fb.Count, ambiguous;
        if (path == FeaturePath.AffineViews)
        {
            var va = a.AffineViewFeatures(look.Detector, look.Tilts, look.FeaturesPerView)!;
            var vb = b.AffineViewFeatures(look.Detector, look.Tilts, look.FeaturesPerView)!;
            var forward = HistogramMatcher.Match(va, fb, settings.Matching);
            var backward = HistogramMatcher.Match(vb, fa, settings.Matching);
            var both = Points(va, a.Compact, fb, b.Compact, forward.Matches)
                .Concat(Points(vb, b.Compact, fa, a.Compact, backward.Matches).Select(m => new Correspondence(m.X2, m.Y2, m.X1, m.Y1)))
                .ToArray();
            // One physical point seen in several views, or matched both ways, is one correspondence.
            matches = DistinctTies.Distinct(both, Math.Max(1.0, compactScale));
            (countA, countB, ambiguous) = (va.Count, vb.Count, forward.AmbiguousCount + backward.AmbiguousCount);
        }
        else
        {
            var result = HistogramMatcher.Match(fa, fb, settings.Matching);
            matches = Points(fa, a.Compact, fb, b.Compact, result.Matches);
            ambiguous = result.AmbiguousCount;
        }
        double matchingMs = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        var options = settings.Estimation;
        double coarse = Math.Max(options.Threshold, 1.5 * compactScale);
        double threshold = Math.Max(options.Threshold, compactScale);
        string counts = path == FeaturePath.AffineViews
            ? Inv($"{name}: {countA} and {countB} features in tilted views, {matches.Length} matches")
            : Inv($"{name}: {countA} and {countB} features, {matches.Length} matches");
        if (matches.Length < settings.MinMatches)
        {
            return (null, counts + Inv($" (at least {settings.MinMatches} needed)"));
        }
        var estimate = PairEstimator.Estimate(matches, a.FullSize, b.FullSize, options with { Threshold = coarse });
        var ties = matches;
        var final = estimate;
        if (estimate.Transform is not null)
        {
            ties = DistinctTies.Distinct(matches, Math.Max(1.0, compactScale));
            final = PairEstimator.Repolish(ties, estimate, a.FullSize, b.FullSize, options with { Threshold = threshold });
        }
        final = final with { FeaturePath = path };
        var tiePoints = final.InlierIndices.Select(i => ties[i]).ToArray();
        var t = final.TimingsMs;
        var outcome = new PairOutcome
        {
            Estimate = final,
            TiePoints = tiePoints,
            FeatureCountA = countA,
            FeatureCountB = countB,
            MatchCount = matches.Length,
            AmbiguousCount = ambiguous,
            RelocalizedCount = 0,
            PatternVersion = a.PatternVersion,
            TimingsMs = new PairTimings(matchingMs, t.Sampling, t.Refinement, 0, t.Polish, Stopwatch.GetElapsedTime(start).TotalMilliseconds),
        };
        return (outcome, Inv($"{counts}, {final.Status.ToString().ToLowerInvariant()} with {final.Consensus.Final} inliers"));
    }

    /// <summary>Matches as full-resolution correspondences (compact pixel x is full-resolution (x + 0.5) * scale - 0.5).</summary>
    private static Correspondence[] Points(ScaleSpaceFeatureSet fa, ScaledImage ca, ScaleSpaceFeatureSet fb, ScaledImage cb, FeatureMatch[] pairs)
    {
        var points = new Correspondence[pairs.Length];
        for (int i = 0; i < points.Length; i++)
        {
            var ka = fa.Keypoints[pairs[i].IndexA];
            var kb = fb.Keypoints[pairs[i].IndexB];
            points[i] = new Correspondence(ca.ToSource(ka.X), ca.ToSource(ka.Y), cb.ToSource(kb.X), cb.ToSource(kb.Y));
        }
        return points;
    }

    private static string Inv(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
