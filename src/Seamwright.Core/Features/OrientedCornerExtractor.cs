using Seamwright.Core.Imaging;

namespace Seamwright.Core.Features;

/// <summary>
/// Oriented corners with binary descriptors over a scale pyramid: each level is the input shrunk
/// by area averaging, corners are detected on every level with a share of the budget
/// proportional to the level's area, and all levels are matched together, so zoom differences
/// within the pyramid's span are found across levels.
/// </summary>
public static class OrientedCornerExtractor
{
    /// <param name="image">The image (usually the working-resolution copy).</param>
    /// <param name="mask">Optional, same size: 255 where corners may be found, anything lower excluded.</param>
    public static FeatureSet Extract(GrayImage image, GrayImage? mask, CornerDetectorOptions options)
    {
        ArgumentNullException.ThrowIfNull(image);
        ArgumentNullException.ThrowIfNull(options);
        options.Validate();
        if (mask is not null && (mask.Width != image.Width || mask.Height != image.Height))
        {
            throw new ArgumentException("The mask must have the image's size.", nameof(mask));
        }
        var budgets = LevelBudgets(options);
        var keypoints = new List<Keypoint>(options.MaxFeatures);
        var descriptors = new List<Descriptor256>(options.MaxFeatures);
        int border = BinaryDescriptor.Reach + 2;
        // Noise is estimated where it is still white (level 0) and carried to every level by simulation.
        double sigma = NoiseLevel.Estimate(image.Pixels, image.Width, image.Height);
        var noisePerLevel = NoiseResponse.PerUnitVariance(options);
        var levelImage = image;
        var levelMask = mask;
        double levelScale = 1.0;
        for (int level = 0; level < options.Levels; level++)
        {
            if (level > 0)
            {
                // Each level from the one before (exact area averaging, so the scales compound exactly):
                // the cost follows the pyramid's size, not levels x image.
                int nextW = AreaResampler.OutputLength(levelImage.Width, options.ScaleFactor);
                int nextH = AreaResampler.OutputLength(levelImage.Height, options.ScaleFactor);
                if (nextW <= 2 * border + 8 || nextH <= 2 * border + 8)
                {
                    break;
                }
                levelImage = AreaResampler.Downscale(levelImage, options.ScaleFactor).Image;
                levelMask = levelMask is null ? null : AreaResampler.Downscale(levelMask, options.ScaleFactor).Image;
                levelScale *= options.ScaleFactor;
            }
            int w = levelImage.Width, h = levelImage.Height;
            var corners = CornerDetector.Detect(levelImage.Pixels, w, h,
                levelMask is null ? ReadOnlySpan<byte>.Empty : levelMask.Pixels, border, budgets[level],
                NoiseFloor(options, noisePerLevel, level, sigma), options);
            if (corners.Count == 0)
            {
                continue;
            }
            var smoothed = GaussianSmoother.Smooth(levelImage.Pixels, w, h, DescriptorPattern.SmoothingSigma,
                DescriptorPattern.SmoothingRadius);
            foreach (var c in corners)
            {
                int cx = (int)MathF.Round(c.X), cy = (int)MathF.Round(c.Y);
                float angle = IntensityCentroid.Angle(levelImage.Pixels, w, cx, cy);
                descriptors.Add(BinaryDescriptor.Compute(smoothed, w, cx, cy, angle));
                keypoints.Add(new Keypoint(
                    (float)ScaledImage.ToSource(c.X, levelScale), (float)ScaledImage.ToSource(c.Y, levelScale),
                    (float)levelScale, angle, c.Response, level));
            }
        }
        return new FeatureSet([.. keypoints], [.. descriptors]);
    }

    /// <summary>
    /// The smallest response kept on a level: NoiseFactor times the mean response of pure noise there,
    /// that is level-0 noise carried through the pyramid plus the rounding to 8 bits of the level
    /// itself (white at that level, at least MinNoiseSigma).
    /// </summary>
    private static float NoiseFloor(CornerDetectorOptions options, double[] perUnit, int level, double sigma)
    {
        double floorSigma = options.MinNoiseSigma;
        double variance = level == 0
            ? perUnit[0] * Math.Max(sigma, floorSigma) * Math.Max(sigma, floorSigma)
            : perUnit[level] * sigma * sigma + perUnit[0] * floorSigma * floorSigma;
        return (float)(options.NoiseFactor * variance);
    }

    /// <summary>Budget per level in proportion to the level's area (geometric in 1 / ScaleFactor^2).</summary>
    internal static int[] LevelBudgets(CornerDetectorOptions options)
    {
        double q = 1.0 / (options.ScaleFactor * options.ScaleFactor);
        double total = 0;
        for (int k = 0; k < options.Levels; k++)
        {
            total += Math.Pow(q, k);
        }
        var budgets = new int[options.Levels];
        int left = options.MaxFeatures;
        for (int k = 0; k < options.Levels; k++)
        {
            budgets[k] = k == options.Levels - 1 ? left : (int)Math.Round(options.MaxFeatures * Math.Pow(q, k) / total);
            budgets[k] = Math.Min(budgets[k], left);
            left -= budgets[k];
        }
        return budgets;
    }
}
