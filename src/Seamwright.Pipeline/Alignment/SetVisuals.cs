using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Preview;
using Seamwright.Pipeline.Report;

namespace Seamwright.Pipeline.Alignment;

/// <summary>The preview mosaic (JPEG) and the report of one set, ready to be written.</summary>
public sealed record SetVisualOutputs(byte[]? PreviewJpeg, SetReport Report, string ReportHtml);

/// <summary>
/// Builds the preview and the report of a set from its alignment and pair results. Each image is
/// decoded at most once for the preview (the thumbnail is cut from that decode) and once more only
/// when it is unplaced.
/// </summary>
public static class SetVisuals
{
    public const string PreviewFileName = "preview.jpg";
    public const string ReportFileName = "report.html";

    public static SetVisualOutputs Build(string setName, string runId, string fingerprint, IReadOnlyList<AlignedImage> images,
        IReadOnlyList<AlignedPair> pairs, SetAlignment alignment, PreviewImageOpener open, PreviewOptions? options = null,
        Seamwright.Core.Cameras.SetModelResult? setModel = null, ReportProvenance? provenance = null, MotionModel? pairModel = null)
    {
        ArgumentNullException.ThrowIfNull(images);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(alignment);
        ArgumentNullException.ThrowIfNull(open);
        options ??= new PreviewOptions();
        options.Validate();
        var thumbnails = new byte[]?[images.Count];
        var tried = new bool[images.Count];
        int thumbSide = options.ThumbnailSideFor(images.Count);
        SixLabors.ImageSharp.Image<SixLabors.ImageSharp.PixelFormats.Rgb24>? OpenAndThumb(int index, int side)
        {
            var image = open(index, Math.Max(side, thumbSide));
            tried[index] = true;
            if (image is not null && thumbnails[index] is null)
            {
                thumbnails[index] = Thumbnails.Jpeg(image, thumbSide);
            }
            return image;
        }
        byte[]? preview = null;
        if (setModel is { Rotation: { } rotation, Extent: { Projection: not Seamwright.Core.Cameras.StitchProjection.Rectilinear } extent })
        {
            // Wide rotation sets: the preview in their suggested projection.
            preview = SphericalPreview.RenderJpeg([.. rotation.Poses.OfType<Seamwright.Core.Cameras.CameraPose>()], extent, OpenAndThumb, options);
        }
        else if (alignment.Canvas is CanvasBounds canvas)
        {
            var placed = alignment.Images.Where(p => p.IsPlaced && p.Component == 0)
                .Select(p => new PreviewImage(p.Index, images[p.Index].Size, p.ToReference!.Value)).ToList();
            preview = PreviewRenderer.RenderJpeg(placed, canvas, OpenAndThumb, options);
        }
        for (int i = 0; i < images.Count; i++)
        {
            if (!tried[i])
            {
                using var image = OpenAndThumb(i, thumbSide);
            }
        }
        long spent = 0;
        for (int i = 0; i < images.Count; i++)
        {
            spent += thumbnails[i]?.Length ?? 0;
            if (spent > options.ThumbnailBudgetBytes)
            {
                thumbnails[i] = null;
            }
        }
        var names = images.Select(i => i.Name).ToList();
        var offPlane = setModel?.OffPlane;
        var reportImages = images.Select((image, i) => new ReportImage(
            image.Name, image.Size.Width, image.Size.Height, thumbnails[i], alignment.Images[i].ToReference?.ToRowMajor(),
            alignment.Reference == i, alignment.Images[i].Reason ?? ComponentNote(alignment, i, names))
            {
                PlacedByCamera = offPlane?[i] is not null,
            }).ToList();
        var reportPairs = pairs.Select(p => new ReportPair(
            images[p.A].Name, images[p.B].Name, p.Estimate.Status.Word(), p.Estimate.InlierIndices.Length, p.Estimate.MatchCount,
            p.Estimate.RmsResidualPx, p.Estimate.CornerSigmaPx, p.Estimate.Reasons, AlignmentSummary.PairNote(alignment, p.A, p.B),
            p.Estimate.FeaturePath.Word())).ToList();
        var report = new SetReport(setName, runId, fingerprint, MotionFamily.Of(alignment.Model).Name, reportImages, reportPairs, preview,
            [.. SetModelSummary.Facts(setModel), .. AlignmentSummary.Facts(alignment, names, offPlane)],
            SetModelSummary.Warnings(AlignmentSummary.Warnings(alignment, names), setModel, names))
        {
            Verdict = ReportVerdict.Judge(alignment, reportPairs, names, provenance?.LeftOut.Count ?? 0, offPlane),
            Provenance = provenance,
            PairModel = pairModel is { } m ? MotionFamily.Of(m).Name : null,
        };
        return new SetVisualOutputs(preview, report, ReportHtml.Render(report));
    }

    private static string? ComponentNote(SetAlignment alignment, int index, IReadOnlyList<string> names)
    {
        var p = alignment.Images[index];
        return p.Component is int c && c > 0 && p.Reference is int r ? $"placed in a separate group, relative to {names[r]}" : null;
    }
}
