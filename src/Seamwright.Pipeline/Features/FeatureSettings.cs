using System.Globalization;
using Seamwright.Core.Features;

namespace Seamwright.Pipeline.Features;

/// <summary>
/// Everything that shapes an image's features. Immutable; <see cref="Fingerprint"/> is a stable
/// string of all values (with the descriptor pattern version), used to key the feature cache.
/// </summary>
public sealed record FeatureSettings
{
    public static FeatureSettings Default { get; } = new();

    /// <summary>Pixels of the analysis image corners are detected on (docs/DESIGN.md stage 1: about 2 megapixels).</summary>
    public long AnalysisPixelBudget { get; init; } = 2_000_000;

    /// <summary>Corner detector and pyramid.</summary>
    public CornerDetectorOptions Detector { get; init; } = new();

    /// <summary>Half side of the correlation template used to re-localise tie points (full-resolution pixels).</summary>
    public int TemplateRadius { get; init; } = 8;

    /// <summary>Smallest correction window searched at full resolution, pixels (grown with the working scale).</summary>
    public int MinSearchRadius { get; init; } = 3;

    public void Validate()
    {
        if (AnalysisPixelBudget < 10_000 || TemplateRadius < 3 || MinSearchRadius < 1)
        {
            throw new ArgumentException("Invalid feature settings: " + this);
        }
        ArgumentNullException.ThrowIfNull(Detector);
        Detector.Validate();
    }

    /// <summary>Half side of the template for an image with the given full-resolution pixels per working pixel.</summary>
    public int TemplateRadiusFor(double workingScale) => Math.Max(TemplateRadius, (int)Math.Ceiling(1.5 * workingScale));

    /// <summary>Search radius for the given working scale: a working pixel's uncertainty twice over, at least MinSearchRadius.</summary>
    public int SearchRadiusFor(double workingScale) => Math.Max(MinSearchRadius, (int)Math.Ceiling(2 * workingScale) + 1);

    /// <summary>Half side of the stored full-resolution patch per keypoint.</summary>
    public int PatchRadiusFor(double workingScale) => TemplateRadiusFor(workingScale) + SearchRadiusFor(workingScale) + 2;

    public string Fingerprint
    {
        get
        {
            var d = Detector;
            return string.Create(CultureInfo.InvariantCulture,
                $"features-v1;pattern={DescriptorPattern.Version};budget={AnalysisPixelBudget};max={d.MaxFeatures};levels={d.Levels};"
                + $"factor={d.ScaleFactor:R};block={d.BlockSize};noise={d.NoiseFactor:R};noisefloor={d.MinNoiseSigma:R};cell={d.CellSize};"
                + $"template={TemplateRadius};search={MinSearchRadius}");
        }
    }
}
