using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>Axis-aligned bounds in reference pixels.</summary>
public readonly record struct CanvasBounds(double MinX, double MinY, double MaxX, double MaxY)
{
    public double Width => MaxX - MinX;

    public double Height => MaxY - MinY;
}

/// <summary>Where one image lands.</summary>
/// <param name="Index">Index of the image in the set.</param>
/// <param name="ToReference">Maps this image's full-resolution pixels to the reference image's pixels; null when unplaced.</param>
/// <param name="Reference">Index of the reference image of its component; null when unplaced.</param>
/// <param name="Component">Position in <see cref="SetAlignment.Components"/>; null when unplaced.</param>
/// <param name="Reason">Why the image is unplaced (null when placed).</param>
public sealed record ImagePlacement(int Index, Transform2D? ToReference, int? Reference, int? Component, string? Reason)
{
    public bool IsPlaced => ToReference is not null;
}

/// <summary>
/// Residuals of the tie points of the used links, measured in each image's own pixels
/// (a tie point counts once in each of its two images).
/// </summary>
/// <param name="TiePoints">Tie points used (after subsampling).</param>
/// <param name="TreeRmsPx">RMS under the spanning-tree chaining.</param>
/// <param name="JointRmsPx">RMS under the joint solution.</param>
/// <param name="JointMedianPx">Median under the joint solution.</param>
/// <param name="JointMaxPx">Largest under the joint solution.</param>
/// <param name="Iterations">Levenberg-Marquardt iterations accepted.</param>
public sealed record ResidualFigures(int TiePoints, double TreeRmsPx, double JointRmsPx, double JointMedianPx, double JointMaxPx, int Iterations)
{
    public static ResidualFigures None { get; } = new(0, 0, 0, 0, 0, 0);
}

/// <summary>A connected group of images aligned on its own.</summary>
/// <param name="Reference">Index of its reference image.</param>
/// <param name="Images">Indices of its placed images, ascending.</param>
/// <param name="Canvas">Bounds of all its placed images in reference pixels.</param>
/// <param name="Residuals">Tree and joint residual figures.</param>
/// <param name="Links">Links used in its joint refinement.</param>
public sealed record AlignmentComponent(int Reference, int[] Images, CanvasBounds Canvas, ResidualFigures Residuals, int Links);

/// <summary>A link left out of the alignment, with the stage and the reason in words.</summary>
public sealed record DemotedLink(int ImageA, int ImageB, string Stage, string Reason);

/// <summary>The immutable result of aligning one set.</summary>
/// <param name="Model">The motion model of the set.</param>
/// <param name="Images">One placement per image, in input order.</param>
/// <param name="Reference">Reference of the main (largest) component; null when nothing could be placed.</param>
/// <param name="Components">Aligned components, the main one first.</param>
/// <param name="Demoted">Links left out, with reasons (input links not accepted by status are not listed).</param>
/// <param name="NotPlanar">True when some images do not fit one plane (wide or all-round sequences).</param>
/// <param name="NonPlanarReasons">Why, in words.</param>
public sealed record SetAlignment(
    MotionModel Model,
    ImagePlacement[] Images,
    int? Reference,
    AlignmentComponent[] Components,
    DemotedLink[] Demoted,
    bool NotPlanar,
    string[] NonPlanarReasons)
{
    /// <summary>Canvas of the main component (null when nothing was placed).</summary>
    public CanvasBounds? Canvas => Components.Length > 0 ? Components[0].Canvas : null;

    /// <summary>True when the placed images form more than one component.</summary>
    public bool IsSplit => Components.Length > 1;

    public int PlacedCount => Images.Count(i => i.IsPlaced);
}
