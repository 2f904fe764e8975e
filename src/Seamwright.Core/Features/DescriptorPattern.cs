namespace Seamwright.Core.Features;

/// <summary>The descriptor sampling pattern in use and its version (written into every output that holds descriptors).</summary>
public static class DescriptorPattern
{
    /// <summary>Bump when the generator, its training data or the descriptor's sampling rule changes.</summary>
    public const string Version = "sw-bin256-v1";

    /// <summary>(x1, y1, x2, y2) per test, 256 tests, points in a disc of radius 15.</summary>
    public static ReadOnlySpan<sbyte> Points => DescriptorPatternTable.Points;

    /// <summary>Gaussian smoothing of the level a descriptor is sampled on (part of the pattern's definition, used offline by its generator too).</summary>
    public const double SmoothingSigma = 2.0;

    public const int SmoothingRadius = 4;
}
