using System.Security.Cryptography;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Processing;

/// <summary>What a run of a set would estimate, without estimating: planned pairs and those with no pair-result cache entry.</summary>
/// <param name="Planned">Pairs the plan holds.</param>
/// <param name="ToEstimate">Planned pairs that would be estimated (no usable cache entry).</param>
/// <param name="NotAnalysed">Images with no feature-cache entry (analysed by the run; one may still turn out bad).</param>
public sealed record PairRedoCount(int Planned, int ToEstimate, int NotAnalysed);

/// <summary>
/// For <c>rerun --dry-run</c>: hashes every image (read-only), takes each image's capture time
/// and coarse signature from the feature cache, plans the pairs as a run would and counts those
/// missing from the pair-result cache. An image not yet analysed is planned with an empty
/// signature, so for <c>all</c> pairing the count is an estimate.
/// </summary>
public static class PairRedoPreview
{
    public static PairRedoCount Count(ProcessingContext ctx, SetInputs set)
    {
        ArgumentNullException.ThrowIfNull(ctx);
        ArgumentNullException.ThrowIfNull(set);
        var profile = ctx.Options.Profile(set.Profile);
        string featureFp = SettingsFingerprint.ForFeatures(profile.Features, ctx.Engine.Name, ctx.Engine.DescriptorVersion);
        var images = new List<PairImage>();
        var plan = new List<PlanImage>();
        int notAnalysed = 0;
        foreach (var f in set.Files)
        {
            string hash;
            try
            {
                using var fs = new FileStream(f.FullPath, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete, 1 << 16);
                hash = Convert.ToHexStringLower(SHA256.HashData(fs));
            }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                continue; // unreadable: the run records it as a bad file
            }
            if (ctx.Cache.TryGetSummary(hash, featureFp, out var analysis))
            {
                plan.Add(new PlanImage(f.Key, analysis.CaptureTime, analysis.Coarse));
            }
            else
            {
                notAnalysed++;
                plan.Add(new PlanImage(f.Key, null, new float[CoarseSignature.Length]));
            }
            images.Add(new PairImage(f.Key, hash, f.FullPath));
        }
        var pairs = PairPlanner.Plan(profile.Pairing, plan).Pairs;
        return new PairRedoCount(pairs.Count, PairRunner.CountToEstimate(ctx, profile, images, pairs), notAnalysed);
    }
}
