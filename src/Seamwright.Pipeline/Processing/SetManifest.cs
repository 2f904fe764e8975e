using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Processing;

/// <summary>The run's counts and its manifest, in memory (pure). Bad files are those the image stage refused plus those the plan skipped.</summary>
public static class SetManifest
{
    public static IEnumerable<(string Key, string Reason)> BadFiles(IReadOnlyList<AnalysedImage> all, PairStageResult pairs)
    {
        ArgumentNullException.ThrowIfNull(all);
        ArgumentNullException.ThrowIfNull(pairs);
        return all.Where(i => i.BadReason is not null).Select(i => (i.Key, i.BadReason!)).Concat(pairs.Plan.Skipped);
    }

    public static RunSummary Summary(SetRun run, IReadOnlyList<AnalysedImage> all, PairStageResult pairs)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(pairs);
        return new RunSummary(
            pairs.Images.Count, BadFiles(all, pairs).Count(), pairs.Pairs.Count,
            pairs.Pairs.Count(p => p.Estimate.Status == PairStatus.Accepted),
            pairs.Pairs.Count(p => p.Estimate.Status == PairStatus.Weak),
            pairs.Pairs.Count(p => p.Estimate.Status == PairStatus.Rejected && !OverlapPlanning.IsNotExpected(p.Estimate)),
            run.Incomplete);
    }

    public static ManifestDocument Build(SetRun run, OutputStamp stamp, IReadOnlyList<AnalysedImage> all, PairStageResult pairs,
        RunSummary summary, ManifestAlignment alignment, IReadOnlyList<ManifestEntry> entries, string time)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(stamp);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(summary);
        ArgumentNullException.ThrowIfNull(entries);
        return new ManifestDocument
        {
            Run = run.RunId,
            Time = time,
            Set = run.SetId,
            Profile = run.Set.Profile,
            Incomplete = run.Incomplete,
            SettingsFingerprint = run.Fingerprint,
            AlgorithmVersion = stamp.AlgorithmVersion,
            ToolVersion = stamp.ToolVersion,
            Engine = stamp.Engine,
            Images = pairs.Images.Select(g => g.Key).ToArray(),
            Skipped = BadFiles(all, pairs).Select(s => new ManifestSkipped(s.Key, s.Reason)).ToArray(),
            Counts = new ManifestCounts(summary.Images, summary.BadFiles, summary.Pairs, summary.Accepted, summary.Weak, summary.Rejected),
            Files = entries.OrderBy(e => e.Path, StringComparer.Ordinal).ToArray(),
            Alignment = alignment,
        };
    }
}
