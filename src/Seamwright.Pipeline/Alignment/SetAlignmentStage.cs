using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Preview;

namespace Seamwright.Pipeline.Alignment;

/// <summary>What the set processing needs from the alignment: sidecar fields, the manifest section, the preview and report.</summary>
/// <param name="Alignment">The alignment itself.</param>
/// <param name="Manifest">The manifest's alignment section.</param>
/// <param name="ReferenceNames">Per image, the file name of its reference (null when unplaced).</param>
/// <param name="ToReferenceRows">Per image, toReference as 3 rows of 3 (null when unplaced).</param>
/// <param name="Visuals">Preview JPEG (null when nothing was placed) and report HTML.</param>
public sealed record AlignmentStageResult(
    SetAlignment Alignment,
    ManifestAlignment Manifest,
    string?[] ReferenceNames,
    double[][]?[] ToReferenceRows,
    SetVisualOutputs Visuals);

/// <summary>Runs the alignment of one set and builds everything it contributes to the outputs.</summary>
public static class SetAlignmentStage
{
    public static AlignmentStageResult Run(string setName, string runId, string fingerprint, IReadOnlyList<AlignedImage> images,
        IReadOnlyList<string> paths, IReadOnlyList<AlignedPair> pairs, MotionModel model, AlignmentSettings settings,
        PreviewImageOpener? open = null)
    {
        ArgumentNullException.ThrowIfNull(images);
        ArgumentNullException.ThrowIfNull(settings);
        var names = images.Select(i => i.Name).ToList();
        var alignment = SetAlignmentInputs.Align(images, pairs, model, settings.ToOptions(names));
        var references = alignment.Images.Select(p => p.Reference is int r ? names[r] : null).ToArray();
        var rows = alignment.Images.Select(p => p.ToReference?.ToRows()).ToArray();
        open ??= new PreviewFiles(paths).Open;
        var visuals = SetVisuals.Build(setName, runId, fingerprint, images, pairs, alignment, open,
            new PreviewOptions { MaxLongSide = settings.PreviewMaxSide });
        return new AlignmentStageResult(alignment, ManifestAlignment.From(alignment, names), references, rows, visuals);
    }
}
