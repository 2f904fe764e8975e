using Seamwright.Core.Alignment;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Preview;

namespace Seamwright.Pipeline.Alignment;

/// <summary>What the set processing needs from the alignment: sidecar fields, the manifest section, the preview and report.</summary>
/// <param name="Alignment">The alignment itself.</param>
/// <param name="Manifest">The manifest's alignment section.</param>
/// <param name="ReferenceNames">Per image, the file name of its reference (null when unplaced).</param>
/// <param name="ToReferenceRows">Per image, toReference as 3 rows of 3 (null when unplaced).</param>
/// <param name="Visuals">Preview JPEG (null when nothing was placed) and report HTML.</param>
/// <param name="SetModel">The set model used and why.</param>
/// <param name="Cameras">Per image, the sidecar camera block (rotation sets only; null otherwise).</param>
/// <param name="ToReferenceReasons">Per image, why toReference is null (null when it is present).</param>
public sealed record AlignmentStageResult(
    SetAlignment Alignment,
    ManifestAlignment Manifest,
    string?[] ReferenceNames,
    double[][]?[] ToReferenceRows,
    SetVisualOutputs Visuals,
    SetModelResult SetModel,
    SidecarCamera?[] Cameras,
    string?[] ToReferenceReasons)
{
    /// <summary>Time spent choosing the set model and aligning in it, ms (0 when a set model computed earlier from the same pairs was used).</summary>
    public double AlignMs { get; init; }

    /// <summary>Time spent on the preview and the report, ms.</summary>
    public double VisualsMs { get; init; }
}

/// <summary>Runs the alignment of one set and builds everything it contributes to the outputs.</summary>
public static class SetAlignmentStage
{
    public static AlignmentStageResult Run(string setName, string runId, string fingerprint, IReadOnlyList<AlignedImage> images,
        IReadOnlyList<string> paths, IReadOnlyList<AlignedPair> pairs, MotionModel model, AlignmentSettings settings,
        PreviewImageOpener? open = null, Report.ReportProvenance? provenance = null, SetModelResult? computed = null, SetCameras? setCameras = null)
    {
        ArgumentNullException.ThrowIfNull(images);
        ArgumentNullException.ThrowIfNull(settings);
        var names = images.Select(i => i.Name).ToList();
        var sizes = images.Select(i => i.Size).ToArray();
        long start = System.Diagnostics.Stopwatch.GetTimestamp();
        // A set model computed from exactly these pairs under the same settings (overlap planning's last forecast) is the same result: not computed twice.
        setCameras ??= SetCameras.Of(sizes);
        var setModel = computed ?? SetModelSelector.Align(sizes, setCameras.CameraOf, SetAlignmentInputs.Links(pairs), model, settings.SetModel,
            settings.ToOptions(names), settings.ToRotationOptions(), setCameras.FocalPx);
        double alignMs = computed is null ? System.Diagnostics.Stopwatch.GetElapsedTime(start).TotalMilliseconds : 0;
        var alignment = setModel.Alignment;
        var references = alignment.Images.Select(p => p.Reference is int r ? names[r] : null).ToArray();
        var rows = alignment.Images.Select(p => p.ToReference?.ToRows()).ToArray();
        var cameras = Enumerable.Range(0, images.Count)
            .Select(i => setModel.Rotation?.Poses[i] is { } pose ? SidecarCamera.From(pose) : null).ToArray();
        var reasons = alignment.Images.Select(p => p.IsPlaced ? null : p.Reason ?? "not placed").ToArray();
        open ??= new PreviewLoader(paths, new Settings.LimitSettings(), new Analysis.MemoryBudget(1L << 30)).Open;
        start = System.Diagnostics.Stopwatch.GetTimestamp();
        var visuals = SetVisuals.Build(setName, runId, fingerprint, images, pairs, alignment, open,
            new PreviewOptions { MaxLongSide = settings.PreviewMaxSide }, setModel, provenance, model);
        double visualsMs = System.Diagnostics.Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        var manifest = ManifestAlignment.From(alignment, names) with { SetModel = ManifestSetModel.From(setModel) };
        if (setModel.IsRotation)
        {
            // A camera that looks away from the reference plane is placed by its camera block: not unplaced.
            manifest = manifest with
            {
                Unplaced = [.. manifest.Unplaced.Where(u => setModel.OffPlane[names.IndexOf(u.Image)] is null)],
                Components = [.. manifest.Components.Select(c => c with { Images = [.. names.Where((_, i) => setModel.Rotation!.Poses[i] is not null)] })],
            };
        }
        return new AlignmentStageResult(alignment, manifest, references, rows, visuals, setModel, cameras, reasons) { AlignMs = alignMs, VisualsMs = visualsMs };
    }
}
