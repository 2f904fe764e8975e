using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Pairs;
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
    /// <summary>
    /// The set model computed by overlap planning from exactly <see cref="Pairs"/> under the run's
    /// settings (the alignment stage then uses it instead of computing it again); null when none was.
    /// </summary>
    public SetModelResult? SetModel { get; init; }

    /// <summary>The set's cameras and their EXIF focal lengths (read once, used by overlap planning and the alignment); null: by size alone.</summary>
    public SetCameras? Cameras { get; init; }

    /// <summary>Time spent forecasting overlaps (set models of the pairs so far), ms.</summary>
    public double OverlapPlanningMs { get; init; }

    public string KeyA(PairResult pair) => Images[pair.A].Key;

    public string KeyB(PairResult pair) => Images[pair.B].Key;
}

/// <summary>
/// Stage 2, pairs: plan the pairs over the good images, estimate each (seed derived from the
/// profile's base seed and the two names), then review accepted pairs of <c>frames</c> sets
/// against the rig baseline, in plan order; other sets get overlap-aware planning (pairs added
/// where the first alignment predicts overlap, failures marked not expected where it predicts none).
/// Estimates come from the corner features; the pairs still undecided and not ruled out by the
/// overlap forecast then get the scale-space second look (<see cref="ScaleSpaceLook"/>), and each
/// pair is reported to the observer once, with its final status.
/// </summary>
public sealed class PairStage(ProcessingContext ctx)
{
    private static readonly ScaleSpaceLook SecondLookRule = new();

    /// <summary>The pairs whose report waits for the second look, by set and seed (a seed names one pair of a set; the stage serves every set).</summary>
    private readonly System.Collections.Concurrent.ConcurrentDictionary<(string Set, ulong Seed), bool> _held = new();

    public PairStageResult Run(SetRun run, IReadOnlyList<AnalysedImage> images, CancellationToken cancel)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(images);
        foreach (var stale in _held.Keys.Where(k => k.Set == run.SetId))
        {
            _held.TryRemove(stale, out _); // left by a cancelled run of the same set
        }
        var good = images.Where(i => i.Analysis is not null).ToList();
        var plan = PairPlanner.Plan(run.Profile.Pairing, good.Select(g => new PlanImage(g.Key, g.Analysis!.CaptureTime, g.Analysis.Coarse)).ToList());
        ctx.Observer.PairsPlanned(run.SetId, plan.Pairs.Count);
        var review = run.Profile.Pairing.Mode == PairingMode.Frames ? ctx.Review : null;
        var cameras = SetCameras.Read([.. good.Select(g => g.File.FullPath)], [.. good.Select(g => g.Analysis!.Size)]);
        if (review is not null)
        {
            var reviewed = SecondLook(run, good, Estimate(run, good, plan.Pairs, report: false, cancel), cancel);
            Review(review, run, good, reviewed);
            return new PairStageResult(good, plan, reviewed) { Cameras = cameras };
        }
        var planned = PlanByOverlap(run, good, plan, cameras, cancel) with { Cameras = cameras };
        var looked = SecondLook(run, good, [.. planned.Pairs], cancel);
        ReportHeld(run, good, looked);
        bool changed = !looked.SequenceEqual(planned.Pairs);
        // The forecast's set model was made from the corner results: the alignment makes its own when the second look changed any.
        return changed ? planned with { Pairs = looked, SetModel = null } : planned;
    }

    /// <summary>The second look's judge of an undecided corner result (null when the profile or the engine has none).</summary>
    private ScaleSpaceLook? Look(SetRun run) => run.Profile.Estimation.ScaleSpaceLook && ctx.Engine.HasSecondLook ? SecondLookRule : null;

    /// <summary>
    /// Estimates pairs from corners (or takes them from the pair-result cache) through
    /// <see cref="PairRunner"/>; reports each as done unless the second look may still change it.
    /// </summary>
    private PairResult[] Estimate(SetRun run, List<AnalysedImage> good, IReadOnlyList<PlannedPair> pairs, bool report, CancellationToken cancel)
    {
        var look = Look(run);
        bool Hold(PairEstimate e)
        {
            if (look is null || !look.Wants(e))
            {
                return false;
            }
            _held.TryAdd((run.SetId, e.Seed), true);
            return true;
        }
        return Run(run, good, pairs, report, secondLook: false, look is null ? null : Hold, cancel);
    }

    private PairResult[] Run(SetRun run, List<AnalysedImage> good, IReadOnlyList<PlannedPair> pairs, bool report, bool secondLook,
        Func<PairEstimate, bool>? hold, CancellationToken cancel)
    {
        var pairImages = good.Select(g => new PairImage(g.Key, g.Hash!, g.File.FullPath)).ToList();
        return PairRunner.Run(ctx, run.Plan, run.SetId, pairImages, pairs, reportEach: report, cancel, secondLook, hold)
            .Select(r => new PairResult(r.A, r.B, r.Analysis, r.PairMs)).ToArray();
    }

    /// <summary>
    /// The second look: the pairs the corners left undecided and that the overlap forecast does not
    /// rule out are estimated again with the scale-space features too (PairProcessor keeps the better result).
    /// </summary>
    private PairResult[] SecondLook(SetRun run, List<AnalysedImage> good, PairResult[] results, CancellationToken cancel)
    {
        if (Look(run) is not { } look)
        {
            return results;
        }
        var undecided = Enumerable.Range(0, results.Length).Where(k => Undecided(look, results[k].Estimate)).ToArray();
        if (undecided.Length == 0)
        {
            return results;
        }
        var again = Run(run, good, [.. undecided.Select(k => new PlannedPair(results[k].A, results[k].B))], report: false, secondLook: true, hold: null, cancel);
        var merged = (PairResult[])results.Clone();
        for (int j = 0; j < undecided.Length; j++)
        {
            merged[undecided[j]] = again[j];
        }
        return merged;
    }

    private static bool Undecided(ScaleSpaceLook look, PairEstimate e) =>
        look.Wants(e) && !e.Reasons.Any(r => r.StartsWith(OverlapPlanning.NotExpectedPrefix, StringComparison.Ordinal));

    /// <summary>Reports, in result order, the pairs the corner pass held back for the second look, with their final status.</summary>
    private void ReportHeld(SetRun run, List<AnalysedImage> good, PairResult[] results)
    {
        foreach (var pr in results)
        {
            if (_held.TryRemove((run.SetId, pr.Estimate.Seed), out _))
            {
                ctx.Observer.PairDone(run.SetId, good[pr.A].Key, good[pr.B].Key, pr.Estimate.Status, pr.Estimate.Reasons);
            }
        }
    }

    /// <summary>
    /// Overlap-aware planning (<see cref="OverlapPlanning"/>): the plan's unconditional pairs are
    /// estimated first; its conditional pairs only where the set model of those does not rule out an
    /// overlap (the others are recorded as not expected to overlap, never estimated); then pairs
    /// forecast to overlap but not planned (the wrap of a full turn, a neighbouring row) are
    /// estimated and added, and pairs not accepted that the last forecast rules out are marked so
    /// (they stop counting as failures). A forecast is recomputed only after new pairs were
    /// estimated; the last one is handed to the alignment stage when it saw every link.
    /// </summary>
    private PairStageResult PlanByOverlap(SetRun run, List<AnalysedImage> good, PairPlan plan, SetCameras cameras, CancellationToken cancel)
    {
        var images = good.Select(g => new AlignedImage(g.Key, g.Analysis!.Size)).ToList();
        var model = run.Profile.Estimation.MotionModel;
        var settings = run.Profile.Alignment;
        double planningMs = 0;
        OverlapForecast? Forecast(PairResult[] pairs)
        {
            long start = System.Diagnostics.Stopwatch.GetTimestamp();
            var forecast = OverlapPlanning.Forecast(images, Aligned(pairs), model, settings, cameras);
            planningMs += System.Diagnostics.Stopwatch.GetElapsedTime(start).TotalMilliseconds;
            return forecast;
        }
        var results = new PairResult[plan.Pairs.Count];
        var first = Enumerable.Range(0, plan.Pairs.Count).Where(k => !plan.Conditional.Contains(k)).ToList();
        Place(results, first, Estimate(run, good, [.. first.Select(k => plan.Pairs[k])], true, cancel));
        OverlapForecast? forecast = null;
        if (first.Count < plan.Pairs.Count)
        {
            // The conditional pairs stand in as not estimated while the others are aligned.
            var conditional = plan.Conditional.Where(k => k >= 0 && k < plan.Pairs.Count).Order().ToList();
            foreach (int k in conditional)
            {
                results[k] = NotEstimated(run, good, plan.Pairs[k], "not estimated yet");
            }
            forecast = Forecast(results);
            var toEstimate = new List<int>();
            foreach (int k in conditional)
            {
                var (a, b) = (plan.Pairs[k].A, plan.Pairs[k].B);
                if (forecast?.Shared(a, b) is double f && f < OverlapPrediction.NotExpectedBelow)
                {
                    results[k] = NotEstimated(run, good, plan.Pairs[k], OverlapPlanning.NotExpectedPrefix + OverlapPlanning.Why(forecast, f) + "; not estimated");
                }
                else
                {
                    toEstimate.Add(k);
                }
            }
            if (toEstimate.Count > 0)
            {
                Place(results, toEstimate, Estimate(run, good, [.. toEstimate.Select(k => plan.Pairs[k])], true, cancel));
                forecast = null;
            }
        }
        forecast ??= Forecast(results);
        if (forecast is null)
        {
            return new PairStageResult(good, plan, results) { OverlapPlanningMs = planningMs };
        }
        var toAdd = OverlapPlanning.ToAdd(forecast, Aligned(results));
        if (toAdd.Count > 0)
        {
            results = [.. results, .. Estimate(run, good, [.. toAdd.Select(p => new PlannedPair(p.A, p.B))], true, cancel)];
            forecast = Forecast(results);
        }
        if (forecast is not null)
        {
            var notExpected = OverlapPlanning.NotExpected(forecast, Aligned(results));
            results = [.. results.Select((p, k) => notExpected.TryGetValue(k, out string? why)
                ? p with { Analysis = p.Analysis with { Estimate = p.Analysis.Estimate with { Reasons = [OverlapPlanning.NotExpectedPrefix + why, .. p.Analysis.Estimate.Reasons] } } }
                : p)];
        }
        return new PairStageResult(good, plan, results)
        {
            SetModel = forecast is { SawEveryLink: true } ? forecast.Result : null,
            OverlapPlanningMs = planningMs,
        };
    }

    private static void Place(PairResult[] results, List<int> at, PairResult[] estimated)
    {
        for (int i = 0; i < at.Count; i++)
        {
            results[at[i]] = estimated[i];
        }
    }

    private static PairResult NotEstimated(SetRun run, List<AnalysedImage> good, PlannedPair pair, string reason) =>
        new(pair.A, pair.B, OverlapPlanning.NotEstimated(run.Profile.Estimation,
            PairSeed.Derive(run.Profile.Estimation.Seed, good[pair.A].Key, good[pair.B].Key), reason), 0);

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
