using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Tests.Processing;

/// <summary>Small in-memory inputs for testing one stage at a time (no files, no decoding).</summary>
internal static class StageInputs
{
    public static AnalysedImage Image(string key, int width = 64, int height = 48) => new()
    {
        File = new InputFile("/nowhere/" + key, "s/" + key, key, 1000, 1),
        Hash = new string('a', 64),
        Analysis = new ImageAnalysis { Size = new ImageSize(width, height), Coarse = [1f], Payload = width },
    };

    public static AnalysedImage Bad(string key, string reason) => new()
    {
        File = new InputFile("/nowhere/" + key, "s/" + key, key, 10, 1),
        BadReason = reason,
    };

    public static SetRun Run(IEnumerable<AnalysedImage> images, ProfileSettings? profile = null, bool incomplete = false) =>
        new(new SetInputs("s", "default", images.Select(i => i.File).ToList(), false), 7, Plan(profile ?? new ProfileSettings()), incomplete);

    public static RunPlan Plan(ProfileSettings profile) => new()
    {
        ProfileName = "default", Profile = profile, Limits = new LimitSettings(), MaxParallelJobs = 2, FeatureMemoryMegabytes = 64, Fingerprint = "fp0123",
    };

    /// <summary>Pairs (i, i+1) estimated by the checksum engine (identity, accepted); <paramref name="rejected"/> lists pair indices turned rejected.</summary>
    public static PairStageResult Chain(IReadOnlyList<AnalysedImage> good, params int[] rejected)
    {
        var engine = new ChecksumEngine();
        var planned = Enumerable.Range(0, good.Count - 1).Select(i => new PlannedPair(i, i + 1)).ToList();
        var results = planned.Select((p, k) =>
        {
            var pa = engine.EstimatePair(good[p.A].Analysis!, good[p.B].Analysis!, new EstimationSettings(), (ulong)(k + 1));
            if (rejected.Contains(k))
            {
                pa = pa with { Estimate = pa.Estimate with { Status = Core.Estimation.PairStatus.Rejected, Transform = null, Reasons = ["made up"] } };
            }
            return new PairResult(p.A, p.B, pa, 1.5);
        }).ToList();
        return new PairStageResult(good, new PairPlan(planned, []), results);
    }
}
