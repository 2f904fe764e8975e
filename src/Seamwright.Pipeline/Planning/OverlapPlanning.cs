using System.Globalization;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Planning;

/// <summary>
/// The set model of a set's pairs so far, as a forecast of which images overlap
/// (<see cref="OverlapPrediction"/>).
/// </summary>
/// <param name="Result">The set model of the pairs with at least <see cref="OverlapPlanning.MinTiePoints"/> tie points.</param>
/// <param name="Sizes">The images' sizes.</param>
/// <param name="SawEveryLink">True when no usable link was left out for too few tie points: the result is then the set's alignment of exactly these pairs.</param>
public sealed record OverlapForecast(SetModelResult Result, ImageSize[] Sizes, bool SawEveryLink)
{
    /// <summary>Predicted shared area of images a and b (the larger share either way); null when either is not placed.</summary>
    public double? Shared(int a, int b) => OverlapPrediction.Shared(Result, Sizes, a, b);

    /// <summary>True when the forecast places both images and predicts less than <see cref="OverlapPrediction.NotExpectedBelow"/> shared area.</summary>
    public bool RulesOut(int a, int b) => Shared(a, b) is double f && f < OverlapPrediction.NotExpectedBelow;
}

/// <summary>
/// Overlap-aware planning (pure): the set model of the estimated pairs forecasts which images
/// overlap. Conditional pairs of the plan (<see cref="PairPlan.Conditional"/>) that the forecast
/// rules out are not estimated at all; pairs forecast to overlap but not planned are added; planned
/// pairs not accepted and forecast not to overlap are recorded as not expected to overlap (a
/// reason starting with <see cref="NotExpectedPrefix"/>) and do not count as rejected in the run's
/// summary.
/// </summary>
public static class OverlapPlanning
{
    public const string NotExpectedPrefix = "not expected to overlap: ";

    /// <summary>Fewest tie points for a pair to count as evidence of where its images lie (judgement).</summary>
    public const int MinTiePoints = 10;

    /// <summary>Most pairs added per image, the largest predicted overlaps first (a work cap).</summary>
    public const int MaxAddedPerImage = 4;

    public static bool IsNotExpected(PairEstimate estimate)
    {
        ArgumentNullException.ThrowIfNull(estimate);
        return estimate.Reasons.Length > 0 && estimate.Reasons[0].StartsWith(NotExpectedPrefix, StringComparison.Ordinal);
    }

    /// <summary>The set model of the pairs with enough tie points; null when no pair has enough to say where its images lie.</summary>
    public static OverlapForecast? Forecast(IReadOnlyList<AlignedImage> images, IReadOnlyList<AlignedPair> pairs, MotionModel model, AlignmentSettings settings,
        SetCameras? cameras = null)
    {
        ArgumentNullException.ThrowIfNull(images);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(settings);
        var all = SetAlignmentInputs.Links(pairs);
        var links = all.Select((l, k) => pairs[k].TiePoints.Count >= MinTiePoints ? l : l with { Status = PairStatus.Rejected }).ToList();
        if (!links.Any(l => l.Status == PairStatus.Accepted))
        {
            return null;
        }
        bool sawEvery = Enumerable.Range(0, links.Count).All(k => links[k].Status == all[k].Status);
        var sizes = images.Select(i => i.Size).ToArray();
        cameras ??= SetCameras.Of(sizes);
        var result = SetModelSelector.Align(sizes, cameras.CameraOf, links, model, settings.SetModel,
            settings.ToOptions([.. images.Select(i => i.Name)]), settings.ToRotationOptions(), cameras.FocalPx);
        return new OverlapForecast(result, sizes, sawEvery);
    }

    /// <summary>Pairs to add, in index order.</summary>
    public static List<(int A, int B)> ToAdd(OverlapForecast forecast, IReadOnlyList<AlignedPair> pairs)
    {
        ArgumentNullException.ThrowIfNull(forecast);
        ArgumentNullException.ThrowIfNull(pairs);
        var (_, toAdd) = OverlapPrediction.Plan(forecast.Result, forecast.Sizes, [.. pairs.Select(p => (p.A, p.B))]);
        var added = new int[forecast.Sizes.Length];
        var chosen = new List<(int A, int B)>();
        foreach (var p in toAdd.OrderByDescending(p => p.Fraction).ThenBy(p => p.A).ThenBy(p => p.B))
        {
            if (added[p.A] < MaxAddedPerImage && added[p.B] < MaxAddedPerImage)
            {
                added[p.A]++;
                added[p.B]++;
                chosen.Add((p.A, p.B));
            }
        }
        return [.. chosen.Order()];
    }

    /// <summary>Index of each pair not accepted (and not already marked) that the forecast rules out, with the reason in words.</summary>
    public static Dictionary<int, string> NotExpected(OverlapForecast forecast, IReadOnlyList<AlignedPair> pairs)
    {
        ArgumentNullException.ThrowIfNull(forecast);
        ArgumentNullException.ThrowIfNull(pairs);
        var map = new Dictionary<int, string>();
        for (int k = 0; k < pairs.Count; k++)
        {
            var p = pairs[k];
            if (p.Estimate.Status != PairStatus.Accepted && !IsNotExpected(p.Estimate) && forecast.Shared(p.A, p.B) is double f
                && f < OverlapPrediction.NotExpectedBelow)
            {
                map[k] = Why(forecast, f);
            }
        }
        return map;
    }

    /// <summary>The reason recorded for a pair the forecast rules out.</summary>
    public static string Why(OverlapForecast forecast, double fraction)
    {
        ArgumentNullException.ThrowIfNull(forecast);
        return string.Create(CultureInfo.InvariantCulture,
            $"the {forecast.Result.Model} alignment of the other links predicts {100 * fraction:0.#} % shared area (below {100 * OverlapPrediction.NotExpectedBelow:0} %)");
    }

    /// <summary>
    /// The record of a pair that was not estimated: rejected, no transform, no tie points, the first
    /// reason <paramref name="reason"/> (use <see cref="NotExpectedPrefix"/> for one ruled out).
    /// </summary>
    public static PairAnalysis NotEstimated(EstimationSettings estimation, ulong seed, string reason)
    {
        ArgumentNullException.ThrowIfNull(estimation);
        var estimate = new PairEstimate
        {
            Model = estimation.MotionModel, Transform = null, MatchCount = 0, InlierIndices = [],
            Consensus = new ConsensusFigures(0, 0, 0, 0), Threshold = estimation.ThresholdPx, Seed = seed,
            Status = PairStatus.Rejected, Reasons = [reason], CornerSigmaPx = double.NaN, RmsResidualPx = double.NaN,
            Iterations = 0, LpCount = 0, Terminations = ["not estimated"], TimingsMs = new EstimateTimings(0, 0, 0, 0),
        };
        return new PairAnalysis(estimate, []);
    }
}
