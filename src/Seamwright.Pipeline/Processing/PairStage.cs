using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Processing;

/// <summary>One estimated pair: indices into <see cref="PairStageResult.Images"/>, the engine's result and its wall time.</summary>
public sealed record PairResult(int A, int B, PairAnalysis Analysis, double PairMs)
{
    public PairEstimate Estimate => Analysis.Estimate;
}

/// <summary>The pairs stage's result: the good images (analysed), the plan over them and one result per planned pair, in plan order.</summary>
public sealed record PairStageResult(IReadOnlyList<AnalysedImage> Images, PairPlan Plan, IReadOnlyList<PairResult> Pairs)
{
    public string KeyA(PairResult pair) => Images[pair.A].Key;

    public string KeyB(PairResult pair) => Images[pair.B].Key;
}

/// <summary>
/// Stage 2, pairs: plan the pairs over the good images, estimate each (seed derived from the
/// profile's base seed and the two names), then review accepted pairs of <c>frames</c> sets
/// against the rig baseline, in plan order.
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
        var results = Estimate(run, good, plan, report: review is null, cancel);
        if (review is not null)
        {
            Review(review, run, good, results);
        }
        return new PairStageResult(good, plan, results);
    }

    /// <summary>Estimates every planned pair (or takes it from the pair-result cache) through <see cref="PairRunner"/>.</summary>
    private PairResult[] Estimate(SetRun run, List<AnalysedImage> good, PairPlan plan, bool report, CancellationToken cancel)
    {
        var pairImages = good.Select(g => new PairImage(g.Key, g.Hash!, g.File.FullPath)).ToList();
        return PairRunner.Run(ctx, run.Plan, run.SetId, pairImages, plan.Pairs, reportEach: report, cancel)
            .Select(r => new PairResult(r.A, r.B, r.Analysis, r.PairMs)).ToArray();
    }

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
