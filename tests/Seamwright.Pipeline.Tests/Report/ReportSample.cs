using Seamwright.Core.Alignment;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Preview;
using Seamwright.Pipeline.Report;
using Seamwright.Pipeline.Tests.Preview;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Pipeline.Tests.Report;

/// <summary>A report of a real small set: six tiles aligned, a preview, thumbnails, pairs of every status.</summary>
internal static class ReportSample
{
    /// <param name="alignment">The sample's alignment.</param>
    /// <param name="withSetModel">Also choose the set model from the sample's links and put its facts in the report.</param>
    public static SetReport Build(out SetAlignment alignment, bool withSetModel = false)
    {
        using var scene = new TileScene(3, 2, 400, 300, 300, 220);
        var sizes = scene.Tiles.Select(_ => scene.TileSize).ToList();
        var links = scene.Links(3);
        // A rejected pair between the far corners and a weak one on the diagonal.
        links.Add(new AlignmentLink(0, 5, Transform2D.Identity, [], PairStatus.Rejected, 0));
        alignment = SetAligner.Align(sizes, links, MotionModel.Translation);
        var placed = alignment.Images.Where(p => p.IsPlaced).Select(p => new PreviewImage(p.Index, scene.TileSize, p.ToReference!.Value)).ToList();
        var preview = PreviewRenderer.RenderJpeg(placed, alignment.Canvas!.Value, (i, s) => scene.Tiles[i].Clone(c => c.Resize(0, Math.Min(s, 300))), new PreviewOptions { MaxLongSide = 640 });
        var names = scene.Names;
        var result = alignment;
        var images = Enumerable.Range(0, names.Count).Select(i => new ReportImage(
            names[i], scene.TileSize.Width, scene.TileSize.Height, Thumbnails.Jpeg(scene.Tiles[i], 160),
            result.Images[i].ToReference?.ToRowMajor(), result.Reference == i, result.Images[i].Reason)).ToList();
        var pairs = links.Select(l => new ReportPair(names[l.ImageA], names[l.ImageB], l.Status.ToString().ToLowerInvariant(),
            l.TiePoints.Length, l.TiePoints.Length + 17, l.Status == PairStatus.Rejected ? double.NaN : 0.41, 1.7,
            l.Status == PairStatus.Rejected ? ["too few inliers: 3 < 8 + 0.3 x 40 (Brown and Lowe, IJCV 2007)"] : [],
            AlignmentSummary.PairNote(result, l.ImageA, l.ImageB))).ToList();
        pairs.Add(new ReportPair(names[1], names[3], "weak", 19, 64, 1.2, 6.5, ["a close runner-up model: repeated pattern?", "<script>alert('x')</script> & co"], null));
        var facts = AlignmentSummary.Facts(result, names);
        if (withSetModel)
        {
            // The set model chosen from the same links, as the alignment stage chooses it: its name and reason lead the panel.
            var model = SetModelSelector.Align(sizes, new int[sizes.Count], links, MotionModel.Homography, SetModelKind.Auto);
            facts = [.. SetModelSummary.Facts(model), .. facts];
        }
        return new SetReport("estate-map <north>", "run-42", "fp-3f9c0a17", "translation", images, pairs, preview, facts, AlignmentSummary.Warnings(result, names));
    }
}
