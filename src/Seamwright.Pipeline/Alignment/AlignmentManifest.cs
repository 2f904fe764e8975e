using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;

namespace Seamwright.Pipeline.Alignment;

/// <summary>Bounds in reference pixels.</summary>
public sealed record ManifestCanvas(double MinX, double MinY, double MaxX, double MaxY);

/// <summary>Residual figures of a component (px, each tie point measured in its own image's pixels).</summary>
public sealed record ManifestResiduals(int TiePoints, double TreeRmsPx, double JointRmsPx, double JointMedianPx, double JointMaxPx, int Iterations);

/// <summary>One aligned component: its reference, its images, its canvas and residuals.</summary>
public sealed record ManifestComponent(string Reference, string[] Images, ManifestCanvas Canvas, ManifestResiduals Residuals);

/// <summary>A link left out of the alignment, with why.</summary>
public sealed record ManifestDemotedLink(string ImageA, string ImageB, string Stage, string Reason);

/// <summary>An image that could not be placed, with why.</summary>
public sealed record ManifestUnplaced(string Image, string Reason);

/// <summary>The alignment section of the set manifest.</summary>
public sealed record ManifestAlignment
{
    public required string MotionModel { get; init; }

    /// <summary>Reference image of the main component (null when nothing was placed).</summary>
    public required string? Reference { get; init; }

    /// <summary>Canvas of the main component in reference pixels (null when nothing was placed).</summary>
    public required ManifestCanvas? Canvas { get; init; }

    /// <summary>Residuals of the main component (null when nothing was placed).</summary>
    public required ManifestResiduals? Residuals { get; init; }

    /// <summary>All components, the main one first; more than one means the set split.</summary>
    public required ManifestComponent[] Components { get; init; }

    public required ManifestUnplaced[] Unplaced { get; init; }

    public required ManifestDemotedLink[] Demoted { get; init; }

    /// <summary>True when some images do not fit one plane (a wide or all-round sequence).</summary>
    public required bool NotPlanar { get; init; }

    public required string[] NotPlanarReasons { get; init; }

    /// <summary>The set model used and why (rotation sets add focal lengths, extent, projection and levelling).</summary>
    public ManifestSetModel? SetModel { get; init; }

    public static ManifestAlignment From(SetAlignment alignment, IReadOnlyList<string> names)
    {
        ArgumentNullException.ThrowIfNull(alignment);
        ArgumentNullException.ThrowIfNull(names);
        var components = alignment.Components.Select(c => new ManifestComponent(
            names[c.Reference], [.. c.Images.Select(i => names[i])], ToCanvas(c.Canvas), ToResiduals(c.Residuals))).ToArray();
        return new ManifestAlignment
        {
            MotionModel = MotionFamily.Of(alignment.Model).Name,
            Reference = alignment.Reference is int r ? names[r] : null,
            Canvas = components.Length > 0 ? components[0].Canvas : null,
            Residuals = components.Length > 0 ? components[0].Residuals : null,
            Components = components,
            Unplaced = [.. alignment.Images.Where(p => !p.IsPlaced).Select(p => new ManifestUnplaced(names[p.Index], p.Reason ?? "not placed"))],
            Demoted = [.. alignment.Demoted.Select(d => new ManifestDemotedLink(names[d.ImageA], names[d.ImageB], d.Stage, d.Reason))],
            NotPlanar = alignment.NotPlanar,
            NotPlanarReasons = alignment.NonPlanarReasons,
        };
    }

    private static ManifestCanvas ToCanvas(CanvasBounds b) => new(Round(b.MinX), Round(b.MinY), Round(b.MaxX), Round(b.MaxY));

    private static ManifestResiduals ToResiduals(ResidualFigures r) =>
        new(r.TiePoints, Round(r.TreeRmsPx), Round(r.JointRmsPx), Round(r.JointMedianPx), Round(r.JointMaxPx), r.Iterations);

    private static double Round(double v) => double.IsFinite(v) ? Math.Round(v, 4) : -1;
}
