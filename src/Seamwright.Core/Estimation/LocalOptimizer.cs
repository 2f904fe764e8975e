using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>LO+ local optimisation (see <see cref="LocalOptimizationSettings"/>).</summary>
internal static class LocalOptimizer
{
    public static (Transform2D Model, ConsensusScore Score) Optimize<TEstimator>(
        TEstimator estimator, ReadOnlySpan<Correspondence> data, Transform2D model, ConsensusScore score,
        double threshold, LocalOptimizationSettings settings, ref Xoshiro256StarStar rng, Scratch scratch)
        where TEstimator : struct, IEstimator
    {
        var best = (model, score);
        int s = estimator.MinimalSampleSize;

        if (IteratedLeastSquares(estimator, data, model, threshold, settings, scratch, out var refined))
        {
            var sc = Scoring.Score(estimator, data, refined, threshold);
            if (sc.IsBetterThan(best.score))
            {
                best = (refined, sc);
            }
        }

        // Inner RANSAC on the inliers of the best model so far.
        var inliers = scratch.Indices;
        Scoring.CollectInliers(estimator, data, best.model, threshold, inliers);
        int innerSize = Math.Min(settings.InnerSampleFactor * s, inliers.Count / 2);
        if (innerSize <= s)
        {
            return best;
        }
        var pool = inliers.ToArray();
        Span<int> pick = innerSize <= 256 ? stackalloc int[innerSize] : new int[innerSize];
        var sample = new Correspondence[innerSize];
        for (int r = 0; r < settings.InnerRepetitions; r++)
        {
            UniformSampler.DrawDistinct(ref rng, pool.Length, pick);
            for (int i = 0; i < innerSize; i++)
            {
                sample[i] = data[pool[pick[i]]];
            }
            if (!estimator.TrySolveLeastSquares(sample, out var candidate))
            {
                continue;
            }
            if (IteratedLeastSquares(estimator, data, candidate, threshold, settings, scratch, out var polished))
            {
                candidate = polished;
            }
            var sc = Scoring.Score(estimator, data, candidate, threshold);
            if (sc.IsBetterThan(best.score))
            {
                best = (candidate, sc);
            }
        }
        return best;
    }

    /// <summary>Least squares on the inliers at a threshold shrinking linearly from K t to t.</summary>
    private static bool IteratedLeastSquares<TEstimator>(
        TEstimator estimator, ReadOnlySpan<Correspondence> data, Transform2D model, double threshold,
        LocalOptimizationSettings settings, Scratch scratch, out Transform2D result)
        where TEstimator : struct, IEstimator
    {
        result = model;
        bool any = false;
        int steps = Math.Max(1, settings.LeastSquaresSteps);
        double start = settings.ThresholdMultiplier * threshold;
        for (int k = 0; k < steps; k++)
        {
            double theta = steps == 1 ? threshold : start - k * (start - threshold) / (steps - 1);
            var selected = scratch.Selected;
            selected.Clear();
            double t2 = theta * theta;
            foreach (ref readonly var m in data)
            {
                if (estimator.SquaredResidual(result, m) <= t2)
                {
                    selected.Add(m);
                }
            }
            if (selected.Count <= estimator.MinimalSampleSize)
            {
                break;
            }
            if (!estimator.TrySolveLeastSquares(System.Runtime.InteropServices.CollectionsMarshal.AsSpan(selected), out var next))
            {
                break;
            }
            result = next;
            any = true;
        }
        return any;
    }

    /// <summary>Reusable buffers for one estimate (never shared between threads).</summary>
    internal sealed class Scratch
    {
        public List<int> Indices { get; } = [];

        public List<Correspondence> Selected { get; } = [];
    }
}

/// <summary>Scoring helpers shared by the loop, local optimisation and the polish.</summary>
internal static class Scoring
{
    public static ConsensusScore Score<TEstimator>(TEstimator estimator, ReadOnlySpan<Correspondence> data, in Transform2D model, double threshold)
        where TEstimator : struct, IEstimator
    {
        double t2 = threshold * threshold;
        int count = 0;
        double cost = 0;
        foreach (ref readonly var m in data)
        {
            double r = estimator.SquaredResidual(model, m);
            if (r <= t2)
            {
                count++;
                cost += r;
            }
            else
            {
                cost += t2;
            }
        }
        return new ConsensusScore(count, cost);
    }

    public static void CollectInliers<TEstimator>(TEstimator estimator, ReadOnlySpan<Correspondence> data, in Transform2D model, double threshold, List<int> into)
        where TEstimator : struct, IEstimator
    {
        into.Clear();
        double t2 = threshold * threshold;
        for (int i = 0; i < data.Length; i++)
        {
            if (estimator.SquaredResidual(model, data[i]) <= t2)
            {
                into.Add(i);
            }
        }
    }
}
