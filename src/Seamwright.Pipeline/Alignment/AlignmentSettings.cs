using Seamwright.Core.Alignment;
using Seamwright.Core.Cameras;

namespace Seamwright.Pipeline.Alignment;

/// <summary>Set alignment and preview settings of a profile (they shape outputs, so the set fingerprint covers them).</summary>
public sealed class AlignmentSettings
{
    /// <summary>Use weak pairs as links too (default false: accepted pairs only).</summary>
    public bool IncludeWeakLinks { get; set; }

    /// <summary>File name of the reference image; "" picks the most connected image.</summary>
    public string ReferenceImage { get; set; } = "";

    /// <summary>Scale of the robust (Cauchy) loss of the joint refinement, px (0.1..100).</summary>
    public double RobustScalePx { get; set; } = 2;

    /// <summary>A link whose median tie-point residual under the joint solution exceeds this is left out, px (0.5..1000).</summary>
    public double LinkResidualLimitPx { get; set; } = 5;

    /// <summary>Set model: Auto (default: rotation when warranted, else the lowest-freedom planar model), Planar (the estimation model) or Rotation.</summary>
    public SetModelKind SetModel { get; set; } = SetModelKind.Auto;

    /// <summary>Rotation sets: one focal length per image instead of one per camera.</summary>
    public bool FocalPerImage { get; set; }

    /// <summary>Rotation sets: radial distortion terms estimated per camera (Auto: k1 when it explains the tie points better; None, K1, K1K2).</summary>
    public DistortionTerms Distortion { get; set; } = DistortionTerms.Auto;

    /// <summary>Longest side of the preview mosaic, px (64..8192).</summary>
    public int PreviewMaxSide { get; set; } = 1600;

    /// <summary>Messages naming each setting out of range (empty when valid).</summary>
    public IReadOnlyList<string> Validate()
    {
        var errors = new List<string>();
        if (!(RobustScalePx >= 0.1 && RobustScalePx <= 100))
        {
            errors.Add($"Alignment:RobustScalePx must be 0.1..100 px (got {RobustScalePx}).");
        }
        if (!(LinkResidualLimitPx >= 0.5 && LinkResidualLimitPx <= 1000))
        {
            errors.Add($"Alignment:LinkResidualLimitPx must be 0.5..1000 px (got {LinkResidualLimitPx}).");
        }
        if (PreviewMaxSide < 64 || PreviewMaxSide > 8192)
        {
            errors.Add($"Alignment:PreviewMaxSide must be 64..8192 px (got {PreviewMaxSide}).");
        }
        return errors;
    }

    /// <summary>Core options of the rotation set model.</summary>
    public RotationSetOptions ToRotationOptions() => new()
    {
        FocalPerImage = FocalPerImage,
        Distortion = Distortion,
        RobustScalePx = RobustScalePx,
        LinkResidualLimitPx = LinkResidualLimitPx,
    };

    /// <summary>Core options for a set whose images have these names (a named reference absent from the set is ignored).</summary>
    public AlignmentOptions ToOptions(IReadOnlyList<string> names)
    {
        ArgumentNullException.ThrowIfNull(names);
        int reference = string.IsNullOrEmpty(ReferenceImage) ? -1 : names.ToList().FindIndex(n => string.Equals(n, ReferenceImage, StringComparison.Ordinal)
            || string.Equals(Path.GetFileName(n), ReferenceImage, StringComparison.Ordinal));
        return new AlignmentOptions
        {
            IncludeWeakLinks = IncludeWeakLinks,
            ReferenceImage = reference >= 0 ? reference : null,
            RobustScalePx = RobustScalePx,
            LinkResidualLimitPx = LinkResidualLimitPx,
        };
    }
}
