using Seamwright.Core.Imaging;

namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// Scale-space features of an image's simulated tilted views (<see cref="AffineViews"/>), pooled and
/// mapped back to the image's own pixels: the features the image would give if seen obliquely.
/// A feature whose support reaches past the image (into the canvas fill of its view) is dropped.
/// Views are processed in plan order, so the pool is the same on every run.
/// </summary>
public static class AffineViewDetector
{
    public static ScaleSpaceFeatureSet Detect(GrayImage image, ScaleSpaceOptions options, int tilts, int featuresPerView)
    {
        ArgumentNullException.ThrowIfNull(image);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentOutOfRangeException.ThrowIfLessThan(featuresPerView, 1);
        var views = AffineViews.Plan(tilts);
        // Views in parallel, pooled in plan order: the same pool whatever the schedule.
        var perView = new (List<ScaleSpaceKeypoint> Keypoints, List<byte> Descriptors)[views.Count];
        Parallel.For(0, views.Count, v => perView[v] = DetectView(image, views[v], options, featuresPerView));
        var keypoints = perView.SelectMany(p => p.Keypoints).ToList();
        var descriptors = perView.SelectMany(p => p.Descriptors).ToList();
        return new ScaleSpaceFeatureSet([.. keypoints], [.. descriptors]);
    }

    private static (List<ScaleSpaceKeypoint>, List<byte>) DetectView(GrayImage image, AffineView view, ScaleSpaceOptions options, int featuresPerView)
    {
        var keypoints = new List<ScaleSpaceKeypoint>();
        var descriptors = new List<byte>();
        var rendered = AffineViews.Render(image, view);
        long pixels = (long)rendered.Image.Width * rendered.Image.Height;
        // Neither doubled nor reduced: the view is already at the resolution the tilt leaves.
        var set = ScaleSpaceDetector.Detect(rendered.Image, options with { PixelBudget = Math.Max(10_000, pixels), MaxFeatures = featuresPerView });
        for (int i = 0; i < set.Count; i++)
        {
            var k = set.Keypoints[i];
            var (x, y) = rendered.ToSource(k.X, k.Y);
            // The support of a descriptor is about 6 sigma across; in the source it stretches by up to the tilt.
            double margin = 3 * k.Sigma * view.Tilt;
            if (x < margin - 0.5 || y < margin - 0.5 || x > image.Width - 0.5 - margin || y > image.Height - 0.5 - margin)
            {
                continue;
            }
            keypoints.Add(new ScaleSpaceKeypoint((float)x, (float)y, k.Sigma, k.Angle, k.Response));
            descriptors.AddRange(set.Descriptor(i));
        }
        return (keypoints, descriptors);
    }
}
