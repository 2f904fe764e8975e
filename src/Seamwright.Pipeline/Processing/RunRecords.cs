using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Processing;

/// <summary>What a run records beside its files (pure): confidence-log records and the ledger's pair and file rows.</summary>
public static class RunRecords
{
    /// <summary>The status word of a bad file in the confidence log.</summary>
    public const string BadFileStatus = "bad-file";

    /// <summary>One record per bad or skipped file, then one per pair in plan order.</summary>
    public static List<ConfidenceRecord> Confidence(SetRun run, IReadOnlyList<AnalysedImage> all, PairStageResult pairs, string time)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(pairs);
        var records = SetManifest.BadFiles(all, pairs).Select(b => FileRecord(run, b.Key, b.Reason, time)).ToList();
        records.AddRange(pairs.Pairs.Select(p => PairRecord(run, pairs.KeyA(p), pairs.KeyB(p), p, time)));
        return records;
    }

    public static List<PairResultRecord> PairRows(PairStageResult pairs)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        return pairs.Pairs.Select(p => new PairResultRecord(pairs.KeyA(p), pairs.KeyB(p), p.Estimate.Status.Word(),
            p.Estimate.InlierIndices.Length, p.Estimate.MatchCount, string.Join("; ", p.Estimate.Reasons))).ToList();
    }

    public static List<FileOutcome> FileOutcomes(IReadOnlyList<AnalysedImage> all)
    {
        ArgumentNullException.ThrowIfNull(all);
        return all.Select(i => new FileOutcome(i.File.RootPath, i.File.Size, i.File.MtimeTicks, i.Hash, i.Decoded, i.BadReason)).ToList();
    }

    /// <summary>An unusable input file: nothing was estimated, so every figure is null (never 0, which reads as perfect).</summary>
    private static ConfidenceRecord FileRecord(SetRun run, string key, string reason, string time) => new()
    {
        Kind = "file",
        Run = run.RunId,
        Time = time,
        Set = run.SetId,
        ImageA = key,
        ImageB = null,
        Status = BadFileStatus,
        InlierCount = null,
        MatchCount = null,
        Homography = null,
        MotionModel = null,
        FeaturePath = null,
        CornerSigmaPx = null,
        RmsResidualPx = null,
        Consensus = null,
        Seed = null,
        Reasons = [reason],
        TimingsMs = null,
        SettingsFingerprint = run.Fingerprint,
    };

    private static ConfidenceRecord PairRecord(SetRun run, string a, string b, PairResult pr, string time)
    {
        var e = pr.Estimate;
        return new ConfidenceRecord
        {
            Kind = "pair",
            Run = run.RunId,
            Time = time,
            Set = run.SetId,
            ImageA = a,
            ImageB = b,
            Status = e.Status.Word(),
            InlierCount = e.InlierIndices.Length,
            MatchCount = e.MatchCount,
            Homography = e.Transform?.ToRows(),
            MotionModel = MotionFamily.Of(e.Model).Name,
            FeaturePath = e.FeaturePath.Word(),
            CornerSigmaPx = OutputNumbers.FiniteOrNull(e.CornerSigmaPx),
            RmsResidualPx = OutputNumbers.FiniteOrNull(e.RmsResidualPx),
            Consensus = new ConfidenceConsensus(e.Consensus.Sampling, e.Consensus.Refined, e.Consensus.Final, e.Consensus.RunnerUp, e.LpCount, e.Iterations),
            Seed = e.Seed.ToString(System.Globalization.CultureInfo.InvariantCulture),
            Reasons = e.Reasons,
            TimingsMs = new ConfidenceTimings(e.TimingsMs.Sampling, e.TimingsMs.Refinement, e.TimingsMs.Polish, e.TimingsMs.Total, pr.PairMs),
            SettingsFingerprint = run.Fingerprint,
        };
    }
}
