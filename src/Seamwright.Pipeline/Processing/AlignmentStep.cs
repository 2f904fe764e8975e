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
        // The preview decodes every placed image once more, in colour and downscaled: reserve the
        // decode in the shared memory budget like any other decode.
        var paths = pairs.Images.Select(g => g.File.FullPath).ToList();
        var files = new PreviewFiles(paths);
        var result = SetAlignmentStage.Run(run.SetId, run.RunId.ToString(CultureInfo.InvariantCulture), run.Fingerprint, images, paths, aligned,
            run.Profile.Estimation.MotionModel, run.Profile.Alignment,
            (i, side) =>
            {
                long bytes = 4L * images[i].Size.Width * images[i].Size.Height;
                using var reservation = ctx.Budget.Reserve(bytes, CancellationToken.None);
                return files.Open(i, side);
            }, provenance, pairs.SetModel, pairs.Cameras);
        ctx.Observer.AlignmentTimed(run.SetId, new AlignmentTimes(pairs.OverlapPlanningMs, result.AlignMs, result.VisualsMs));
        return result;
    }
}
