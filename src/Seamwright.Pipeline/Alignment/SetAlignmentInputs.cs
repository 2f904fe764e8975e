using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Pipeline.Alignment;

/// <summary>One usable image of a set: its file name (key) and full-resolution size as displayed.</summary>
public sealed record AlignedImage(string Name, ImageSize Size);

/// <summary>One estimated pair: indices into the images, the estimate (A to B) and its full-resolution tie points.</summary>
public sealed record AlignedPair(int A, int B, PairEstimate Estimate, IReadOnlyList<Correspondence> TiePoints);

/// <summary>Builds the set alignment from the pairwise results of a set.</summary>
public static class SetAlignmentInputs
{
    /// <summary>
    /// Confidence of a link for the spanning tree: inliers discounted by the corner uncertainty,
    /// inliers / (1 + corner sigma in px). Many well-spread inliers give a certain transform.
    /// </summary>
    public static double LinkWeight(PairEstimate estimate)
    {
        ArgumentNullException.ThrowIfNull(estimate);
        double sigma = double.IsFinite(estimate.CornerSigmaPx) ? Math.Max(0, estimate.CornerSigmaPx) : 1e6;
        return estimate.InlierIndices.Length / (1 + sigma);
    }

    public static IReadOnlyList<AlignmentLink> Links(IReadOnlyList<AlignedPair> pairs)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        var links = new List<AlignmentLink>(pairs.Count);
        foreach (var p in pairs)
        {
            // A pair without a model cannot be a link; keep it as a rejected one so indices line up.
            var transform = p.Estimate.Transform ?? Transform2D.Identity;
            var status = p.Estimate.Transform is null ? PairStatus.Rejected : p.Estimate.Status;
            links.Add(new AlignmentLink(p.A, p.B, transform, [.. p.TiePoints], status, LinkWeight(p.Estimate)));
        }
        return links;
    }

    public static SetAlignment Align(IReadOnlyList<AlignedImage> images, IReadOnlyList<AlignedPair> pairs, MotionModel model, AlignmentOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(images);
        return SetAligner.Align([.. images.Select(i => i.Size)], Links(pairs), model, options);
    }
}
