using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Processing;

/// <summary>One estimated pair: indices into <see cref="PairStageResult.Images"/>, the engine's result and its wall time.</summary>
public sealed record PairResult(int A, int B, PairAnalysis Analysis, double PairMs)
{
    public PairEstimate Estimate => Analysis.Estimate;
}

/// <summary>The pairs stage's result: the good images (analysed), the plan over them and one result per planned pair, in plan order, followed by the pairs overlap planning added.</summary>
public sealed record PairStageResult(IReadOnlyList<AnalysedImage> Images, PairPlan Plan, IReadOnlyList<PairResult> Pairs)
{
    public string KeyA(PairResult pair) => Images[pair.A].Key;

    public string KeyB(PairResult pair) => Images[pair.B].Key;
}

/// <summary>
/// Stage 2, pairs: plan the pairs over the good images, estimate each (seed derived from the
/// profile's base seed and the two names), then review accepted pairs of <c>frames</c> sets
/// against the rig baseline, in plan order; other sets get overlap-aware planning (pairs added
/// where the first alignment predicts overlap, failures marked not expected where it predicts none).
/// </summary>
public sealed class PairStage(ProcessingContext ctx)
{
    public PairStageResult Run(SetRun run, IReadOnlyList<AnalysedImage> images, CancellationToken cancel)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(images);
        var good = images.Where(i => i.Analysis is not null).ToList();
        var plan = PairPlanner.Plan(run.Profile.Pairing, good.Select(g => new PlanImage(g.Key, g.Analysis!.CaptureTime, g.Analysis.Coarse)).ToList());
        ctx.Observer.PairsPlanned(run.SetId, plan.Pairs.Count);
        var review = run.Profile.Pairing.Mode == PairingMode.Frames ? ctx.Review : null;
        var results = Estimate(run, good, plan.Pairs, report: review is null, cancel);
        if (review is not null)
        {
            Review(review, run, good, results);
        }
        else
        {
            results = PlanByOverlap(run, good, results, cancel);
        }
        return new PairStageResult(good, plan, results);
    }

    /// <summary>Estimates every planned pair (or takes it from the pair-result cache) through <see cref="PairRunner"/>.</summary>
    private PairResult[] Estimate(SetRun run, List<AnalysedImage> good, IReadOnlyList<PlannedPair> pairs, bool report, CancellationToken cancel)
    {
        var pairImages = good.Select(g => new PairImage(g.Key, g.Hash!, g.File.FullPath)).ToList();
        return PairRunner.Run(ctx, run.Plan, run.SetId, pairImages, pairs, reportEach: report, cancel)
            .Select(r => new PairResult(r.A, r.B, r.Analysis, r.PairMs)).ToArray();
    }

    /// <summary>
    /// Overlap-aware planning: from the alignment of the first links, pairs predicted to overlap
    /// but not planned (the wrap of a full turn, a neighbouring row) are estimated and added; planned
    /// pairs that were not accepted and are predicted not to overlap are marked so and stop counting
    /// as failures (<see cref="OverlapPlanning"/>).
    /// </summary>
    private PairResult[] PlanByOverlap(SetRun run, List<AnalysedImage> good, PairResult[] pairResults, CancellationToken cancel)
    {
        var images = good.Select(g => new AlignedImage(g.Key, g.Analysis!.Size)).ToList();
        var model = run.Profile.Estimation.MotionModel;
        var toAdd = OverlapPlanning.ToAdd(images, Aligned(pairResults), model, run.Profile.Alignment);
        if (toAdd.Count > 0)
        {
            pairResults = [.. pairResults, .. Estimate(run, good, [.. toAdd.Select(p => new PlannedPair(p.A, p.B))], true, cancel)];
        }
        var notExpected = OverlapPlanning.NotExpected(images, Aligned(pairResults), model, run.Profile.Alignment);
        return [.. pairResults.Select((p, k) => notExpected.TryGetValue(k, out string? why)
            ? p with { Analysis = p.Analysis with { Estimate = p.Analysis.Estimate with { Reasons = [OverlapPlanning.NotExpectedPrefix + why, .. p.Analysis.Estimate.Reasons] } } }
            : p)];
    }

    private static List<AlignedPair> Aligned(PairResult[] pairResults) =>
        [.. pairResults.Select(p => new AlignedPair(p.A, p.B, p.Analysis.Estimate, p.Analysis.TiePoints))];

    /// <summary>Rig check of a <c>frames</c> set, in plan order (deterministic): a deviating accepted pair becomes weak with the reason.</summary>
    private void Review(IPairReview review, SetRun run, List<AnalysedImage> good, PairResult[] results)
    {
        for (int k = 0; k < results.Length; k++)
        {
            var pr = results[k];
            var est = pr.Estimate;
            string keyA = good[pr.A].Key, keyB = good[pr.B].Key;
            if (est is { Status: PairStatus.Accepted, Transform: { } t }
                && review.ReviewAccepted(run.Set.Profile, run.Profile, run.SetId, keyA, keyB, t, good[pr.A].Analysis!.Size) is { } reason)
            {
                est = est with { Status = PairStatus.Weak, Reasons = [.. est.Reasons, reason] };
                results[k] = pr with { Analysis = pr.Analysis with { Estimate = est } };
            }
            ctx.Observer.PairDone(run.SetId, keyA, keyB, est.Status, est.Reasons);
        }
    }
}
