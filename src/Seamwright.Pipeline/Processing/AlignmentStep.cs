using System.Globalization;
using Seamwright.Pipeline.Alignment;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Stage 3, alignment: places the set's good images in one reference frame from the pair results
/// and builds the preview and report (<see cref="SetAlignmentStage"/>).
/// </summary>
public sealed class AlignmentStep(ProcessingContext ctx)
{
    public AlignmentStageResult Run(SetRun run, IReadOnlyList<AnalysedImage> all, PairStageResult pairs, DateTime writtenUtc)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(pairs);
        var provenance = Report.ReportProvenanceBuilder.For(run.Set, run.Profile, writtenUtc, ProcessingContext.ToolVersion, SetManifest.BadFiles(all, pairs));
        var images = pairs.Images.Select(g => new AlignedImage(g.Key, g.Analysis!.Size)).ToList();
        var aligned = pairs.Pairs.Select(p => new AlignedPair(p.A, p.B, p.Estimate, p.Analysis.TiePoints)).ToList();
        // The preview opens every placed image once more, in colour and downscaled, through the
        // engine: the loader with this run's limits (in the service, in a supervised worker).
        var paths = pairs.Images.Select(g => g.File.FullPath).ToList();
        var open = ctx.Engine.PreviewOpener(paths, run.Plan.Limits, ctx.Budget);
        var result = SetAlignmentStage.Run(run.SetId, run.RunId.ToString(CultureInfo.InvariantCulture), run.Fingerprint, images, paths, aligned,
            run.Profile.Estimation.MotionModel, run.Profile.Alignment, open, provenance, pairs.SetModel, pairs.Cameras);
        ctx.Observer.AlignmentTimed(run.SetId, new AlignmentTimes(pairs.OverlapPlanningMs, result.AlignMs, result.VisualsMs));
        return result;
    }
}
