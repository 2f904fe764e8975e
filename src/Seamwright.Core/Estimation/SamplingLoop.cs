using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>Settings of one sampling run.</summary>
/// <param name="Threshold">Inlier threshold on the forward transfer error, pixels.</param>
/// <param name="Confidence">Probability p of the termination bound.</param>
/// <param name="MaxIterations">Cap on samples drawn (degenerate ones included).</param>
/// <param name="LocalOptimization">LO+ settings.</param>
/// <param name="Distinct">When set, only models distinct from this one count (runner-up search).</param>
internal sealed record SamplingSettings(
    double Threshold,
    double Confidence,
    int MaxIterations,
    LocalOptimizationSettings LocalOptimization,
    DistinctnessRule? Distinct = null);

/// <summary>A model is distinct from <paramref name="Reference"/> when some corner moves more than the distance.</summary>
internal sealed record DistinctnessRule(Transform2D Reference, (double X, double Y)[] Corners, double MinCornerDistance)
{
    public bool Accepts(in Transform2D model) =>
        Transform2D.MaxPointDistance(Reference, model, Corners) > MinCornerDistance;
}

/// <summary>Outcome of a sampling run.</summary>
public sealed record SamplingOutcome(
    Transform2D? Model, ConsensusScore Score, int Iterations, int DegenerateSamples, int LocalOptimizations, string Termination);

/// <summary>
/// The one seeded sampling loop (RANSAC, Fischler and Bolles, CACM 1981), generic over a struct
/// estimator and a struct sampler: draw, reject degenerate samples, solve, score, and on each new
/// best run local optimisation and tighten the termination bound. No time caps: the work depends
/// only on the data, the settings and the seed.
/// </summary>
internal static class SamplingLoop
{
    public static SamplingOutcome Run<TEstimator, TSampler>(
        TEstimator estimator, ref TSampler sampler, ReadOnlySpan<Correspondence> data,
        SamplingSettings settings, ref Xoshiro256StarStar loRng)
        where TEstimator : struct, IEstimator
        where TSampler : struct, ISampler
    {
        int s = estimator.MinimalSampleSize;
        if (data.Length < s)
        {
            return new SamplingOutcome(null, ConsensusScore.None, 0, 0, 0, "fewer matches than the minimal sample");
        }
        Span<int> indices = stackalloc int[s];
        var sample = new Correspondence[s];
        Span<Transform2D> models = stackalloc Transform2D[4];
        var scratch = new LocalOptimizer.Scratch();

        Transform2D? best = null;
        var bestScore = ConsensusScore.None;
        int required = settings.MaxIterations;
        int iterations = 0, degenerate = 0, localRuns = 0;
        // A progressive sampler draws from the top-ranked matches only, so the standard bound (which
        // assumes uniform draws over all matches) is not yet a guarantee when it is first met. Then
        // a uniform phase of the bound's length follows (the bound keeps tightening on new bests).
        int phaseStart = 0;
        bool confirming = sampler.IsUniform;
        while (true)
        {
            if (iterations >= settings.MaxIterations)
            {
                break;
            }
            if (iterations - phaseStart >= required)
            {
                if (confirming)
                {
                    break;
                }
                confirming = true;
                sampler.SwitchToUniform();
                phaseStart = iterations;
                continue;
            }
            iterations++;
            sampler.Draw(indices);
            for (int i = 0; i < s; i++)
            {
                sample[i] = data[indices[i]];
            }
            if (estimator.IsDegenerate(sample))
            {
                degenerate++;
                continue;
            }
            int count = estimator.SolveMinimal(sample, models);
            for (int k = 0; k < count; k++)
            {
                var model = models[k];
                if (!model.IsFinite || (settings.Distinct is { } rule && !rule.Accepts(model)))
                {
                    continue;
                }
                var score = Scoring.Score(estimator, data, model, settings.Threshold);
                if (!score.IsBetterThan(bestScore))
                {
                    continue;
                }
                best = model;
                bestScore = score;
                if (settings.LocalOptimization.Enabled)
                {
                    localRuns++;
                    var (lo, loScore) = LocalOptimizer.Optimize(estimator, data, model, score, settings.Threshold, settings.LocalOptimization, ref loRng, scratch);
                    if (loScore.IsBetterThan(bestScore) && (settings.Distinct is not { } r2 || r2.Accepts(lo)))
                    {
                        best = lo;
                        bestScore = loScore;
                    }
                }
                double ratio = (double)bestScore.Inliers / data.Length;
                required = Math.Min(required, TerminationBound.Samples(settings.Confidence, ratio, s, settings.MaxIterations));
            }
        }
        string termination = iterations < settings.MaxIterations
            ? FormattableString.Invariant($"confidence bound reached after {iterations} samples (p = {settings.Confidence})")
            : FormattableString.Invariant($"iteration cap of {settings.MaxIterations} samples reached");
        return new SamplingOutcome(best, bestScore, iterations, degenerate, localRuns, termination);
    }
}
