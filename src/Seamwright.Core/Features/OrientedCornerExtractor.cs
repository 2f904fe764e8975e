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
    /// <param name="mask">Optional, same size: pixels below 128 are excluded from detection.</param>
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
        var pattern = DescriptorPattern.Points;
        int border = BinaryDescriptor.Reach + 2;
        var levelImage = image;
        var levelMask = mask;
        for (int level = 0; level < options.Levels; level++)
        {
            double f = Math.Pow(options.ScaleFactor, level);
            int w = (int)Math.Round(image.Width / f), h = (int)Math.Round(image.Height / f);
            if (w <= 2 * border + 8 || h <= 2 * border + 8)
            {
                break;
            }
            if (level > 0)
            {
                // Each level from the one before: the cost follows the pyramid's size, not levels x image.
                levelImage = AreaResampler.Downscale(levelImage, w, h);
                levelMask = levelMask is null ? null : AreaResampler.Downscale(levelMask, w, h);
            }
            var corners = CornerDetector.Detect(levelImage.Pixels, w, h,
                levelMask is null ? ReadOnlySpan<byte>.Empty : levelMask.Pixels, border, budgets[level], options);
            if (corners.Count == 0)
            {
                continue;
            }
            var smoothed = GaussianSmoother.Smooth(levelImage.Pixels, w, h, DescriptorPatternGenerator.SmoothingSigma,
                DescriptorPatternGenerator.SmoothingRadius);
            double sx = (double)image.Width / w, sy = (double)image.Height / h;
            foreach (var c in corners)
            {
                int cx = (int)MathF.Round(c.X), cy = (int)MathF.Round(c.Y);
                float angle = IntensityCentroid.Angle(levelImage.Pixels, w, cx, cy);
                descriptors.Add(BinaryDescriptor.Compute(smoothed, w, cx, cy, angle, pattern));
                keypoints.Add(new Keypoint(
                    (float)((c.X + 0.5) * sx - 0.5), (float)((c.Y + 0.5) * sy - 0.5),
                    (float)Math.Sqrt(sx * sy), angle, c.Response, level));
            }
        }
        return new FeatureSet([.. keypoints], [.. descriptors]);
    }

    /// <summary>
    /// The working copy: the image shrunk by area averaging to at most maxPixels (a copy when it
    /// already fits). Per-axis factor full / working is Width / working.Width.
    /// </summary>
    public static GrayImage ShrinkToBudget(GrayImage image, long maxPixels)
    {
        ArgumentNullException.ThrowIfNull(image);
        long pixels = (long)image.Width * image.Height;
        if (pixels <= maxPixels)
        {
            return image;
        }
        double s = Math.Sqrt((double)pixels / maxPixels);
        int w = Math.Max(1, (int)Math.Floor(image.Width / s)), h = Math.Max(1, (int)Math.Floor(image.Height / s));
        return AreaResampler.Downscale(image, w, h);
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
