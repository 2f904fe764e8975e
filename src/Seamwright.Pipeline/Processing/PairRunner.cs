using System.Diagnostics;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Processing;

/// <summary>An image of a set as the pair stage needs it: name, content hash and path (features are fetched when needed).</summary>
public sealed record PairImage(string Key, string Hash, string FullPath);

/// <summary>One pair's outcome and whether it came from the pair-result cache.</summary>
public sealed record PairRun(int A, int B, PairAnalysis Analysis, double PairMs, bool Reused);

/// <summary>
/// Estimates a set's planned pairs, in parallel within the shared job slots: a pair whose images
/// and pair settings are unchanged is taken from the <see cref="PairResultCache"/>; the others
/// are estimated from features held in a <see cref="FeatureLru"/> bounded by
/// <c>Service:FeatureMemoryMegabytes</c> and read from the feature cache on a miss (an image
/// missing from it is analysed again). Results do not depend on the budget, the cache or the
/// number of workers: each pair's estimate depends only on its two images, the settings and its
/// seed.
/// </summary>
public static class PairRunner
{
    /// <param name="runPlan">The run's settings snapshot (profile, limits, parallelism, feature memory): never the live options.</param>
    /// <param name="reportEach">Report each pair to the observer as it is done, except those <paramref name="holdReport"/> keeps back.</param>
    /// <param name="secondLook">Estimate with the scale-space second look (the pass for undecided pairs); otherwise corners only.</param>
    public static PairRun[] Run(ProcessingContext ctx, RunPlan runPlan, string setId, IReadOnlyList<PairImage> images,
        IReadOnlyList<PlannedPair> plan, bool reportEach, CancellationToken cancel, bool secondLook = false, Func<PairEstimate, bool>? holdReport = null)
    {
        ArgumentNullException.ThrowIfNull(ctx);
        ArgumentNullException.ThrowIfNull(runPlan);
        var profile = runPlan.Profile;
        ArgumentNullException.ThrowIfNull(images);
        ArgumentNullException.ThrowIfNull(plan);
        var estimation = profile.Estimation.WithScaleSpaceLook(secondLook);
        string featureFp = SettingsFingerprint.ForFeatures(profile.Features, ctx.Engine.Name, ctx.Engine.DescriptorVersion);
        string pairFp = SettingsFingerprint.ForPair(featureFp, estimation, ctx.AlgorithmVersion);
        var pathOf = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var im in images)
        {
            pathOf.TryAdd(im.Hash, im.FullPath);
        }
        var features = new FeatureLru((long)runPlan.FeatureMemoryMegabytes << 20,
            hash => LoadFeatures(ctx, runPlan, featureFp, hash, pathOf[hash], cancel));
        var results = new PairRun[plan.Count];
        Parallel.For(0, plan.Count, new ParallelOptions { MaxDegreeOfParallelism = runPlan.MaxParallelJobs, CancellationToken = cancel }, k =>
        {
            var (a, b) = (plan[k].A, plan[k].B);
            ctx.JobSlots.Wait(cancel);
            try
            {
                results[k] = One(ctx, estimation, images[a], images[b], a, b, pairFp, features);
                if (reportEach && holdReport?.Invoke(results[k].Analysis.Estimate) != true)
                {
                    var e = results[k].Analysis.Estimate;
                    ctx.Observer.PairDone(setId, images[a].Key, images[b].Key, e.Status, e.Reasons);
                }
            }
            finally
            {
                ctx.JobSlots.Release();
            }
        });
        cancel.ThrowIfCancellationRequested();
        int reused = results.Count(r => r.Reused);
        if (secondLook)
        {
            ctx.Observer.SecondLooks(setId, results.Length - reused, reused, results.Count(r => r.Analysis.Estimate.FeaturePath == FeaturePath.ScaleSpace));
        }
        else
        {
            ctx.Observer.PairsCounted(setId, results.Length - reused, reused);
        }
        return results;
    }

    /// <summary>How many of the planned pairs have no usable entry in the pair-result cache (what a run would estimate).</summary>
    public static int CountToEstimate(ProcessingContext ctx, ProfileSettings profile, IReadOnlyList<PairImage> images, IReadOnlyList<PlannedPair> plan)
    {
        ArgumentNullException.ThrowIfNull(ctx);
        ArgumentNullException.ThrowIfNull(profile);
        ArgumentNullException.ThrowIfNull(images);
        ArgumentNullException.ThrowIfNull(plan);
        string featureFp = SettingsFingerprint.ForFeatures(profile.Features, ctx.Engine.Name, ctx.Engine.DescriptorVersion);
        string pairFp = SettingsFingerprint.ForPair(featureFp, profile.Estimation.WithScaleSpaceLook(false), ctx.AlgorithmVersion);
        return plan.Count(p => !ctx.Pairs.Contains(pairFp, KeyOf(images[p.A], images[p.B])));
    }

    private static string KeyOf(PairImage a, PairImage b) => PairResultCache.Key(a.Hash, a.Key, b.Hash, b.Key);

    private static PairRun One(ProcessingContext ctx, EstimationSettings estimation, PairImage a, PairImage b, int ia, int ib, string pairFp, FeatureLru features)
    {
        var sw = Stopwatch.StartNew();
        string key = KeyOf(a, b);
        if (ctx.Pairs.TryGet(pairFp, key, out var cached))
        {
            return new PairRun(ia, ib, cached, sw.Elapsed.TotalMilliseconds, Reused: true);
        }
        ulong seed = PairSeed.Derive(estimation.Seed, a.Key, b.Key);
        var fa = features.Get(a.Hash);
        var fb = features.Get(b.Hash);
        var pa = ctx.Engine.EstimatePair(fa, fb, estimation, seed);
        ctx.Pairs.Put(pairFp, key, pa);
        return new PairRun(ia, ib, pa, sw.Elapsed.TotalMilliseconds, Reused: false);
    }

    private static (ImageAnalysis, long) LoadFeatures(ProcessingContext ctx, RunPlan runPlan, string featureFp, string hash, string path, CancellationToken cancel)
    {
        if (ctx.Cache.TryGet(hash, featureFp, out var analysis, out long bytes))
        {
            return (analysis, bytes);
        }
        // The entry vanished or was damaged since the image stage: analyse the file again (same features).
        analysis = ctx.Engine.Analyze(path, runPlan.Profile.Features, runPlan.Limits, ctx.Budget, cancel);
        byte[] encoded = ctx.Engine.Encode(analysis);
        ctx.Cache.Put(hash, featureFp, analysis);
        return (analysis, encoded.Length);
    }
}
