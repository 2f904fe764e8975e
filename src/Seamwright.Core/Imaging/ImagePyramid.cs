namespace Seamwright.Core.Imaging;

/// <summary>Settings of an image pyramid.</summary>
/// <param name="ScaleStep">Size ratio between neighbouring levels (greater than 1; e.g. sqrt(2) or 2).</param>
/// <param name="MaxLevels">Most levels, the base included.</param>
/// <param name="MinSide">A level is only made while its shorter side stays at least this long.</param>
public sealed record PyramidOptions(double ScaleStep = 1.4142135623730951, int MaxLevels = 8, int MinSide = 32)
{
    public void Validate()
    {
        if (!double.IsFinite(ScaleStep) || ScaleStep <= 1.0 || ScaleStep > 8.0)
        {
            throw new ArgumentOutOfRangeException(nameof(ScaleStep), ScaleStep, "ScaleStep must lie in (1, 8].");
        }
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(MaxLevels);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(MinSide);
    }
}

/// <summary>
/// A scale pyramid. Level 0 is the base image; level k is made from level k-1 by area averaging
/// with the configured step, and <see cref="ScaledImage.Scale"/> of each level is its exact
/// cumulative factor relative to the base, so <c>x_base = (x_level + 0.5) s - 0.5</c>.
/// </summary>
public sealed class ImagePyramid
{
    private readonly ScaledImage[] _levels;

    private ImagePyramid(ScaledImage[] levels) => _levels = levels;

    public int Count => _levels.Length;

    public ScaledImage this[int level] => _levels[level];

    public IReadOnlyList<ScaledImage> Levels => _levels;

    public static ImagePyramid Build(GrayImage baseImage, PyramidOptions options)
    {
        ArgumentNullException.ThrowIfNull(baseImage);
        ArgumentNullException.ThrowIfNull(options);
        options.Validate();
        var levels = new List<ScaledImage> { new(baseImage, 1.0) };
        while (levels.Count < options.MaxLevels)
        {
            var previous = levels[^1];
            int w = AreaResampler.OutputLength(previous.Image.Width, options.ScaleStep);
            int h = AreaResampler.OutputLength(previous.Image.Height, options.ScaleStep);
            if (Math.Min(w, h) < options.MinSide)
            {
                break;
            }
            var next = AreaResampler.Downscale(previous.Image, options.ScaleStep);
            levels.Add(new ScaledImage(next.Image, previous.Scale * options.ScaleStep));
        }
        return new ImagePyramid([.. levels]);
    }
}
