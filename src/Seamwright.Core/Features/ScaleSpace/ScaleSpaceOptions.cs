namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// Settings of the scale-space detector and its gradient-histogram descriptor. The defaults are
/// those of Lowe, "Distinctive Image Features from Scale-Invariant Keypoints", IJCV 2004
/// (three intervals per octave, base deviation 1.6, contrast 0.04 on a 0..1 scale, principal
/// curvature ratio 10, 4 x 4 cells of 8 orientations).
/// </summary>
public sealed record ScaleSpaceOptions
{
    /// <summary>Pixels the detection image may hold; smaller images are doubled first (Lowe 2004, section 3.3) while they fit.</summary>
    public long PixelBudget { get; init; } = 2_000_000;

    public int IntervalsPerOctave { get; init; } = 3;

    public double BaseSigma { get; init; } = 1.6;

    /// <summary>Blur already present in the input, pixels (Lowe 2004: 0.5).</summary>
    public double InputSigma { get; init; } = 0.5;

    /// <summary>Smallest |difference of Gaussians| at an extremum, on a 0..1 intensity scale, divided by the intervals (as Lowe's 0.03 is for 3).</summary>
    public double ContrastThreshold { get; init; } = 0.04;

    /// <summary>Largest ratio of principal curvatures (edges have one large and one small).</summary>
    public double EdgeRatio { get; init; } = 10;

    /// <summary>Keypoints kept per image, strongest |response| first.</summary>
    public int MaxFeatures { get; init; } = 3000;

    /// <summary>
    /// Contrast floor relative to the image's measured noise: an extremum must exceed this many
    /// deviations of the noise as it survives in the difference-of-Gaussian layer.
    /// </summary>
    public double NoiseFactor { get; init; } = 3.0;

    public void Validate()
    {
        if (PixelBudget < 10_000 || IntervalsPerOctave < 1 || BaseSigma <= 0 || InputSigma < 0 || InputSigma >= BaseSigma
            || ContrastThreshold <= 0 || EdgeRatio <= 1 || MaxFeatures < 1 || NoiseFactor < 0)
        {
            throw new ArgumentException("Invalid scale-space options: " + this);
        }
    }
}
