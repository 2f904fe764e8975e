using System.Diagnostics;
using Seamwright.Core.Geometry;
using Seamwright.Core.Quality;

namespace Seamwright.Core.Estimation;

/// <summary>
/// Pairwise transform from tentative matches (docs/DESIGN.md stages 6-9): seeded sampling with local
/// optimisation, deterministic consensus refinement, final polish, runner-up search and decision.
/// Each stage is also public so a caller can re-polish on re-localised tie points.
/// Deterministic: same matches, sizes and options give bit-identical results (timings aside).
/// </summary>
public static class PairEstimator
{
    // Independent random streams derived from the one seed.
    private const ulong LocalOptimizationStream = 0x4C4F_2B00_0000_0001UL;
    private const ulong RunnerUpStream = 0x5255_4E00_0000_0002UL;

    /// <summary>Estimates the transform from the first image to the second. Matches come best-first.</summary>
    public static PairEstimate Estimate(ReadOnlySpan<Correspondence> matches, ImageSize sizeA, ImageSize sizeB, EstimationOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        options.Validate();
        CheckSize(sizeA, nameof(sizeA));
        CheckSize(sizeB, nameof(sizeB));
        long start = Stopwatch.GetTimestamp();

        var sampling = Sample(matches, options);
        double samplingMs = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        var terminations = new List<string> { "sampling: " + sampling.Termination };
        if (sampling.Model is not { } sampled)
        {
            var none = PairDecision.Decide(new PairEvidence(options.Model, null, matches.Length, 0, 0, 0, double.NaN, options.Threshold, null), options.Decision);
            double ms = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
            return new PairEstimate
            {
                Model = options.Model, Transform = null, MatchCount = matches.Length, InlierIndices = [],
                Consensus = new ConsensusFigures(0, 0, 0, 0), Threshold = options.Threshold, Seed = options.Seed,
                Status = none.Status, Reasons = none.Reasons, CornerSigmaPx = double.NaN, RmsResidualPx = double.NaN,
                Iterations = sampling.Iterations, LpCount = 0, Terminations = [.. terminations],
                TimingsMs = new EstimateTimings(samplingMs, 0, 0, ms),
            };
        }
        int samplingConsensus = TransferError.Consensus(sampled, matches, options.Threshold);

        long refineStart = Stopwatch.GetTimestamp();
        var refined = sampled;
        int refinedConsensus = samplingConsensus, lpCount = 0;
        if (options.Refine)
        {
            var r = ConsensusRefiner.Refine(matches, sampled, options.Model, options.Threshold, options.Refiner);
            lpCount = r.LinearPrograms;
            int after = r.Transform.IsFinite ? TransferError.Consensus(r.Transform, matches, options.Threshold) : -1;
            // The refiner promises never to lose consensus; verify rather than trust.
            if (after >= samplingConsensus)
            {
                refined = r.Transform;
                refinedConsensus = after;
                terminations.Add("refinement: " + r.Termination);
            }
            else
            {
                terminations.Add("refinement: " + r.Termination + " (result lost consensus; kept the sampling model)");
            }
        }
        else
        {
            terminations.Add("refinement: off");
        }
        double refineMs = Stopwatch.GetElapsedTime(refineStart).TotalMilliseconds;

        long polishStart = Stopwatch.GetTimestamp();
        var polish = Polish(matches, refined, sizeA, options);
        terminations.Add("polish: " + polish.Termination);
        int runnerUp = RunnerUpConsensus(matches, polish.Transform, polish.InlierIndices, sizeA, options);
        double polishMs = Stopwatch.GetElapsedTime(polishStart).TotalMilliseconds;

        var verdict = Decide(matches, polish.Transform, polish.Consensus, runnerUp, polish.CornerSigmaPx, sizeA, sizeB, options);
        return new PairEstimate
        {
            Model = options.Model,
            Transform = polish.Transform,
            MatchCount = matches.Length,
            InlierIndices = polish.InlierIndices,
            Consensus = new ConsensusFigures(samplingConsensus, refinedConsensus, polish.Consensus, runnerUp),
            Threshold = options.Threshold,
            Seed = options.Seed,
            Status = verdict.Status,
            Reasons = verdict.Reasons,
            CornerSigmaPx = polish.CornerSigmaPx,
            RmsResidualPx = polish.RmsResidualPx,
            Iterations = sampling.Iterations,
            LpCount = lpCount,
            Terminations = [.. terminations],
            TimingsMs = new EstimateTimings(samplingMs, refineMs, polishMs, Stopwatch.GetElapsedTime(start).TotalMilliseconds),
        };
    }

    /// <summary>
    /// Final polish of a given model on (possibly re-localised) matches: Levenberg-Marquardt on the
    /// inliers, re-selection at the threshold, until stable.
    /// </summary>
    public static PolishResult Polish(ReadOnlySpan<Correspondence> matches, Transform2D model, ImageSize sizeA, EstimationOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        options.Validate();
        CheckSize(sizeA, nameof(sizeA));
        return FinalPolish.Run(options.Model, matches, model, sizeA, options.Threshold, options.PolishMaxRounds, options.PolishConsensusTolerance);
    }

    /// <summary>
    /// Re-polishes an earlier estimate on re-localised matches (same matches, same order, new
    /// coordinates, e.g. at full resolution) and decides again. Sampling, refinement and runner-up
    /// figures are carried over from <paramref name="previous"/>; timings add the new polish.
    /// </summary>
    public static PairEstimate Repolish(ReadOnlySpan<Correspondence> matches, PairEstimate previous, ImageSize sizeA, ImageSize sizeB, EstimationOptions options)
    {
        ArgumentNullException.ThrowIfNull(previous);
        ArgumentNullException.ThrowIfNull(options);
        options.Validate();
        CheckSize(sizeB, nameof(sizeB));
        if (previous.Transform is not { } model)
        {
            return previous;
        }
        long start = Stopwatch.GetTimestamp();
        var polish = Polish(matches, model, sizeA, options);
        var verdict = Decide(matches, polish.Transform, polish.Consensus, previous.Consensus.RunnerUp, polish.CornerSigmaPx, sizeA, sizeB, options);
        double ms = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        var t = previous.TimingsMs;
        return previous with
        {
            Transform = polish.Transform,
            MatchCount = matches.Length,
            InlierIndices = polish.InlierIndices,
            Consensus = previous.Consensus with { Final = polish.Consensus },
            Status = verdict.Status,
            Reasons = verdict.Reasons,
            CornerSigmaPx = polish.CornerSigmaPx,
            RmsResidualPx = polish.RmsResidualPx,
            Terminations = [.. previous.Terminations, "re-polish: " + polish.Termination],
            TimingsMs = new EstimateTimings(t.Sampling, t.Refinement, t.Polish + ms, t.Total + ms),
        };
    }

    /// <summary>The decision for a final transform (see <see cref="PairDecision"/>).</summary>
    public static PairVerdict Decide(ReadOnlySpan<Correspondence> matches, Transform2D? transform, int consensus, int runnerUpConsensus,
        double cornerSigmaPx, ImageSize sizeA, ImageSize sizeB, EstimationOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        // Judged where the images overlap (the inliers' box), not over the whole first image.
        string? sanity = transform is { } h
            ? MotionFamily.Of(options.Model).FindSanityProblem(h, OverlapRegion.Corners(matches, TransferError.InlierIndices(h, matches, options.Threshold), sizeA), options.Sanity, "image's overlap")
            : null;
        int overlap = transform is { } t ? OverlapCount(matches, t, sizeB) : 0;
        var evidence = new PairEvidence(options.Model, transform, matches.Length, overlap, consensus, runnerUpConsensus, cornerSigmaPx, options.Threshold, sanity);
        return PairDecision.Decide(evidence, options.Decision);
    }

    /// <summary>Seeded sampling with local optimisation alone (stage 6).</summary>
    public static SamplingOutcome Sample(ReadOnlySpan<Correspondence> matches, EstimationOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        var settings = new SamplingSettings(options.Threshold, options.Confidence, options.MaxIterations, options.LocalOptimization);
        return Dispatch(matches, options, settings, options.Seed, options.Sampler);
    }

    /// <summary>
    /// Consensus of the best model that is distinct from <paramref name="best"/> (a corner of the first
    /// image moves by more than <see cref="EstimationOptions.RunnerUpCornerThresholds"/> thresholds),
    /// searched and counted among the matches that are not inliers of the best model, so a
    /// re-fit of the same inliers never counts. 0 when none is found.
    /// </summary>
    public static int RunnerUpConsensus(ReadOnlySpan<Correspondence> matches, Transform2D best, ReadOnlySpan<int> bestInliers, ImageSize sizeA, EstimationOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        int s = MotionFamily.Of(options.Model).MinimalSampleSize;
        var rest = new List<Correspondence>(matches.Length - bestInliers.Length);
        int k = 0;
        for (int i = 0; i < matches.Length; i++)
        {
            if (k < bestInliers.Length && bestInliers[k] == i)
            {
                k++;
                continue;
            }
            rest.Add(matches[i]);
        }
        int minimum = s + options.Decision.MinInliersAboveMinimal;
        if (rest.Count < minimum || options.RunnerUpMaxIterations == 0)
        {
            return 0;
        }
        // Enough samples to find, with the configured confidence, a runner-up that would matter:
        // one holding the larger of the minimum and the "close" share of the best's support.
        double wanted = Math.Max(minimum, s + options.Decision.RunnerUpCloseRatio * (bestInliers.Length - s));
        int budget = TerminationBound.Samples(options.Confidence, Math.Min(1, wanted / rest.Count), s, options.RunnerUpMaxIterations);
        var rule = new DistinctnessRule(best, Transform2D.Corners(sizeA.Width, sizeA.Height), options.RunnerUpCornerThresholds * options.Threshold);
        var settings = new SamplingSettings(options.Threshold, options.Confidence, Math.Max(budget, 1), options.LocalOptimization, rule);
        var outcome = Dispatch(System.Runtime.InteropServices.CollectionsMarshal.AsSpan(rest), options, settings,
            SplitMix64.Mix(options.Seed ^ RunnerUpStream), options.Sampler);
        return outcome.Model is null ? 0 : Math.Max(outcome.Score.Inliers, 0);
    }

    private static SamplingOutcome Dispatch(ReadOnlySpan<Correspondence> data, EstimationOptions o, SamplingSettings settings, ulong seed, SamplerKind kind) =>
        MotionFamily.Of(o.Model).Sample(data, o, settings, seed, kind);

    /// <summary>The sampling loop with one family's estimator (called by the family, see <see cref="MotionFamily.Sample"/>).</summary>
    internal static SamplingOutcome Run<TEstimator>(TEstimator estimator, ReadOnlySpan<Correspondence> data, EstimationOptions o, SamplingSettings settings, ulong seed, SamplerKind kind)
        where TEstimator : struct, IEstimator
    {
        int s = estimator.MinimalSampleSize;
        if (data.Length < s)
        {
            return new SamplingOutcome(null, ConsensusScore.None, 0, 0, 0, $"{data.Length} matches; the model needs {s}");
        }
        var loRng = new Xoshiro256StarStar(SplitMix64.Mix(seed ^ LocalOptimizationStream));
        if (kind == SamplerKind.Prosac)
        {
            var sampler = new ProsacSampler(seed, data.Length, s, o.ProsacGrowthHorizon ?? settings.MaxIterations);
            return SamplingLoop.Run(estimator, ref sampler, data, settings, ref loRng);
        }
        var uniform = new UniformSampler(seed, data.Length);
        return SamplingLoop.Run(estimator, ref uniform, data, settings, ref loRng);
    }

    /// <summary>Matches whose first point maps inside the second image (pixel centres at integers).</summary>
    private static int OverlapCount(ReadOnlySpan<Correspondence> matches, in Transform2D h, ImageSize sizeB)
    {
        int count = 0;
        foreach (var m in matches)
        {
            if (h.W(m.X1, m.Y1) > 0 && h.TryApply(m.X1, m.Y1, out double u, out double v) &&
                u >= -0.5 && v >= -0.5 && u <= sizeB.Width - 0.5 && v <= sizeB.Height - 0.5)
            {
                count++;
            }
        }
        return count;
    }

    private static void CheckSize(ImageSize size, string name)
    {
        if (size.Width <= 0 || size.Height <= 0)
        {
            throw new ArgumentException($"Image size must be positive (got {size}).", name);
        }
    }
}
