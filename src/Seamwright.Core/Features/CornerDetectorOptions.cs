namespace Seamwright.Core.Features;

/// <summary>Settings of the corner detector and the scale pyramid.</summary>
public sealed record CornerDetectorOptions
{
    /// <summary>Most features kept per image, over all pyramid levels.</summary>
    public int MaxFeatures { get; init; } = 4000;

    /// <summary>Pyramid levels (level 0 is the working image).</summary>
    public int Levels { get; init; } = 8;

    /// <summary>Size ratio between neighbouring levels; Levels and ScaleFactor together must span a 2x zoom.</summary>
    public double ScaleFactor { get; init; } = 1.25;

    /// <summary>Side of the window the structure tensor is summed over (odd).</summary>
    public int BlockSize { get; init; } = 5;

    /// <summary>
    /// A corner's smaller tensor eigenvalue must exceed this many times the mean smaller eigenvalue
    /// that pure noise of the image's estimated level gives on the same pyramid level (so blank paper
    /// yields no corners). 8 was chosen on noise-only images of 1200 x 900 with deviations 0.5 to 6
    /// (see NoiseFloorTests): 4 left up to a hundred corners, 6 two, 8 none.
    /// </summary>
    public double NoiseFactor { get; init; } = 8.0;

    /// <summary>Floor on the noise deviation of every level in gray levels (rounding to 8 bits alone gives 0.29; compression adds more).</summary>
    public double MinNoiseSigma { get; init; } = 0.5;

    /// <summary>Side of the grid cells (pixels of each level) used to spread the pick over the image.</summary>
    public int CellSize { get; init; } = 24;

    public void Validate()
    {
        if (MaxFeatures < 1 || Levels < 1 || ScaleFactor <= 1.0 || BlockSize < 3 || BlockSize % 2 == 0
            || NoiseFactor < 0 || MinNoiseSigma < 0 || CellSize < 4)
        {
            throw new ArgumentException("Invalid corner detector options: " + this);
        }
    }
}
