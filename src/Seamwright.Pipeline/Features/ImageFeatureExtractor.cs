using Seamwright.Core.Features;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;

namespace Seamwright.Pipeline.Features;

/// <summary>Features of one full-resolution gray image: detect on an analysis image, keep full-resolution patches.</summary>
public static class ImageFeatureExtractor
{
    public static ImageFeatures Extract(GrayImage full, FeatureMask? mask, FeatureSettings settings)
    {
        ArgumentNullException.ThrowIfNull(full);
        ArgumentNullException.ThrowIfNull(settings);
        settings.Validate();
        var scaled = AreaResampler.ToPixelBudget(full, settings.AnalysisPixelBudget);
        var working = scaled.Image;
        double scale = scaled.Scale;
        var workingMask = mask?.Rasterize(full.Width, full.Height, working.Width, working.Height);
        var set = OrientedCornerExtractor.Extract(working, workingMask, settings.Detector);
        int radius = settings.PatchRadiusFor(scale);
        int side = 2 * radius + 1;
        var keypoints = new Keypoint[set.Count];
        var patches = new byte[(long)set.Count * side * side];
        for (int i = 0; i < set.Count; i++)
        {
            var k = set.Keypoints[i];
            var f = k with
            {
                X = (float)scaled.ToSource(k.X),
                Y = (float)scaled.ToSource(k.Y),
                Scale = (float)(k.Scale * scale),
            };
            keypoints[i] = f;
            CopyPatch(full, ImageFeatures.PatchCentre(f.X), ImageFeatures.PatchCentre(f.Y), radius, patches.AsSpan(i * side * side, side * side));
        }
        var compact = (long)working.Width * working.Height <= ImageFeatures.CompactPixels
            ? scaled
            : AreaResampler.ToPixelBudget(full, ImageFeatures.CompactPixels);
        return new ImageFeatures(new ImageSize(full.Width, full.Height), new ImageSize(working.Width, working.Height), scale,
            keypoints, set.Descriptors, radius, patches, DescriptorPattern.Version, settings.Fingerprint, compact,
            mask?.Rasterize(full.Width, full.Height, compact.Image.Width, compact.Image.Height));
    }

    private static void CopyPatch(GrayImage image, int cx, int cy, int r, Span<byte> dst)
    {
        int side = 2 * r + 1;
        for (int v = -r; v <= r; v++)
        {
            int y = Math.Clamp(cy + v, 0, image.Height - 1);
            var row = image.Row(y);
            var d = dst.Slice((v + r) * side, side);
            if (cx - r >= 0 && cx + r < image.Width)
            {
                row.Slice(cx - r, side).CopyTo(d);
                continue;
            }
            for (int u = -r; u <= r; u++)
            {
                d[u + r] = row[Math.Clamp(cx + u, 0, image.Width - 1)];
            }
        }
    }
}
