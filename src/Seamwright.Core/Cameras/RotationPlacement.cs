using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>
/// A rotation solution as plane transforms into the reference image: K_r R_r^T R_i K_i^-1 for
/// every camera whose whole image lands in front of the reference (w &gt; 0 at its corners);
/// the others keep their camera but get no plane transform, with the reason.
/// </summary>
public static class RotationPlacement
{
    public static (SetAlignment Alignment, string?[] OffPlane) ToSetAlignment(IReadOnlyList<ImageSize> sizes, RotationSetSolution rotation)
    {
        ArgumentNullException.ThrowIfNull(sizes);
        ArgumentNullException.ThrowIfNull(rotation);
        int n = sizes.Count;
        var reference = rotation.Poses[rotation.Reference]!;
        var placements = new ImagePlacement[n];
        var offPlane = new string?[n];
        var placed = new List<int>();
        double minX = double.PositiveInfinity, minY = double.PositiveInfinity, maxX = double.NegativeInfinity, maxY = double.NegativeInfinity;
        for (int i = 0; i < n; i++)
        {
            if (rotation.Poses[i] is not { } pose)
            {
                placements[i] = new ImagePlacement(i, null, null, null, rotation.Reasons[i] ?? "not placed");
                continue;
            }
            var h = pose.ToCamera(reference);
            var corners = Transform2D.Corners(sizes[i].Width, sizes[i].Height);
            if (!pose.InFrontOf(reference, sizes[i].Width, sizes[i].Height) || corners.Any(c => !(h.W(c.X, c.Y) > 0)))
            {
                offPlane[i] = "looks away from the reference image's plane (part of it maps behind the reference camera); its camera block places it";
                placements[i] = new ImagePlacement(i, null, null, null, offPlane[i]);
                continue;
            }
            foreach (var (x, y) in corners)
            {
                var (u, v) = h.Apply(x, y);
                minX = Math.Min(minX, u);
                minY = Math.Min(minY, v);
                maxX = Math.Max(maxX, u);
                maxY = Math.Max(maxY, v);
            }
            placements[i] = new ImagePlacement(i, h, rotation.Reference, 0, null);
            placed.Add(i);
        }
        var r = rotation.Residuals;
        var component = new AlignmentComponent(rotation.Reference, [.. placed], new CanvasBounds(minX, minY, maxX, maxY),
            new ResidualFigures(r.TiePoints, r.InitialRmsPx, r.RmsPx, r.MedianPx, r.MaxPx, r.Iterations), r.Links);
        var demoted = rotation.LeftOut.Select(l => new DemotedLink(l.ImageA, l.ImageB, "rotation model", l.Reason)).ToArray();
        var offReasons = Enumerable.Range(0, n).Where(i => offPlane[i] is not null).Select(i => $"image {i}: {offPlane[i]}").ToArray();
        var alignment = new SetAlignment(MotionFamily.Homography.Model, placements, rotation.Reference, [component], demoted, offReasons.Length > 0, offReasons);
        return (alignment, offPlane);
    }
}
