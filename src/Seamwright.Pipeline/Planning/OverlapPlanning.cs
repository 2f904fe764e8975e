using System.Globalization;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Alignment;

namespace Seamwright.Pipeline.Planning;

/// <summary>
/// Overlap-aware planning (pure): after the planned pairs are estimated, the set model of their
/// accepted links predicts which images overlap (<see cref="OverlapPrediction"/>). Pairs predicted
/// to overlap but not planned are added; planned pairs not accepted and predicted not to overlap
/// are recorded as not expected to overlap (a reason starting with <see cref="NotExpectedPrefix"/>)
/// and do not count as rejected in the run's summary.
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

    /// <summary>Pairs to add, in index order.</summary>
    public static List<(int A, int B)> ToAdd(IReadOnlyList<AlignedImage> images, IReadOnlyList<AlignedPair> pairs, MotionModel model, AlignmentSettings settings)
    {
        if (Predict(images, pairs, model, settings) is not var (result, sizes))
        {
            return [];
        }
        var (_, toAdd) = OverlapPrediction.Plan(result, sizes, [.. pairs.Select(p => (p.A, p.B))]);
        var added = new int[images.Count];
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

    /// <summary>Index of each planned pair not accepted and predicted not to overlap, with the reason in words.</summary>
    public static Dictionary<int, string> NotExpected(IReadOnlyList<AlignedImage> images, IReadOnlyList<AlignedPair> pairs, MotionModel model, AlignmentSettings settings)
    {
        if (Predict(images, pairs, model, settings) is not var (result, sizes))
        {
            return [];
        }
        var (notExpected, _) = OverlapPrediction.Plan(result, sizes, [.. pairs.Select(p => (p.A, p.B))]);
        var index = new Dictionary<(int, int), int>();
        for (int k = 0; k < pairs.Count; k++)
        {
            index.TryAdd((pairs[k].A, pairs[k].B), k);
        }
        var map = new Dictionary<int, string>();
        foreach (var p in notExpected)
        {
            if (index.TryGetValue((p.A, p.B), out int k) && pairs[k].Estimate.Status != PairStatus.Accepted)
            {
                map[k] = string.Create(CultureInfo.InvariantCulture,
                    $"the {result.Model} alignment of the other links predicts {100 * p.Fraction:0.#} % shared area (below {100 * OverlapPrediction.NotExpectedBelow:0} %)");
            }
        }
        return map;
    }

    /// <summary>The set model of the pairs with enough tie points; null when no pair has enough to say where its images lie.</summary>
    private static (SetModelResult Result, ImageSize[] Sizes)? Predict(IReadOnlyList<AlignedImage> images, IReadOnlyList<AlignedPair> pairs, MotionModel model, AlignmentSettings settings)
    {
        ArgumentNullException.ThrowIfNull(images);
        ArgumentNullException.ThrowIfNull(settings);
        var links = SetAlignmentInputs.Links(pairs).Select((l, k) => pairs[k].TiePoints.Count >= MinTiePoints ? l : l with { Status = PairStatus.Rejected }).ToList();
        if (!links.Any(l => l.Status == PairStatus.Accepted))
        {
            return null;
        }
        var sizes = images.Select(i => i.Size).ToArray();
        var result = SetModelSelector.Align(sizes, SetCameras.Of(sizes), links, model, settings.SetModel,
            settings.ToOptions([.. images.Select(i => i.Name)]), settings.ToRotationOptions());
        return (result, sizes);
    }
}
