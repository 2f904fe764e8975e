using Seamwright.Core.Imaging;

namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// Scale-space features of a gray image: differences of Gaussians, their refined extrema,
/// dominant directions and gradient-histogram descriptors (Lowe, IJCV 2004), with a contrast
/// floor that also rises with the image's measured noise (<see cref="NoiseLevel"/>), so a grainy
/// image keeps its structure instead of filling up with noise blobs. Octave by octave, so at most
/// one octave's images are held. Keypoints come back in pixels of the given image, strongest first.
/// </summary>
public static class ScaleSpaceDetector
{
    private const int MinOctaveSide = 24;
    private const int MaxAnglesPerPoint = 4;

    public static ScaleSpaceFeatureSet Detect(GrayImage image, ScaleSpaceOptions options)
    {
        ArgumentNullException.ThrowIfNull(image);
        ArgumentNullException.ThrowIfNull(options);
        options.Validate();
        var (baseImage, mapping, inputBlur) = BaseImage(image, options);
        double noise = NoiseLevel.Estimate(image.Pixels, image.Width, image.Height) / 255.0 / mapping.Scale;
        int s = options.IntervalsPerOctave;
        var candidates = new List<Candidate>();
        // The Gaussians the descriptors are computed on (layers 1..s of every octave); the rest is dropped octave by octave.
        var kept = new List<FloatPlane[]>();
        var current = baseImage.Blurred(Math.Sqrt(options.BaseSigma * options.BaseSigma - inputBlur * inputBlur));
        for (int o = 0; Math.Min(current.Width, current.Height) >= MinOctaveSide; o++)
        {
            var octave = GaussianOctave.Create(current, o, options);
            foreach (var e in ExtremumLocator.Find(octave, Contrasts(octave, options, noise), options.EdgeRatio))
            {
                double sigma = options.BaseSigma * Math.Pow(2, (e.Layer + e.LayerOffset) / s);
                candidates.Add(new Candidate(new ScaleSpaceKeypoint(e.X, e.Y, (float)sigma, 0, e.Response), o, e.Layer));
            }
            kept.Add(octave.Gaussians[1..(s + 1)]);
            current = octave.NextBase();
        }
        return Describe(options, kept, mapping, candidates);
    }

    private readonly record struct Candidate(ScaleSpaceKeypoint Point, int Octave, int Layer);

    /// <summary>Detection pixels to input pixels: input = detection * Scale + Offset.</summary>
    private readonly record struct Mapping(double Scale, double Offset);

    /// <summary>The contrast floor of each difference layer (index = layer): Lowe's threshold, raised where the noise left in that layer is larger.</summary>
    private static double[] Contrasts(GaussianOctave octave, ScaleSpaceOptions options, double noise)
    {
        int s = options.IntervalsPerOctave;
        var c = new double[octave.Differences.Length];
        for (int layer = 0; layer < c.Length; layer++)
        {
            c[layer] = Math.Max(options.ContrastThreshold / s,
                options.NoiseFactor * DifferenceNoise(noise / octave.Step, octave.Sigmas[layer], octave.Sigmas[layer + 1]));
        }
        return c;
    }

    /// <summary>
    /// The detection image: the input doubled while four times its pixels fit the budget (Lowe 2004,
    /// section 3.3), else area-averaged down to it. Returns input pixels per detection pixel and the
    /// blur assumed in the detection image.
    /// </summary>
    private static (FloatPlane Image, Mapping Mapping, double Blur) BaseImage(GrayImage image, ScaleSpaceOptions options)
    {
        long pixels = (long)image.Width * image.Height;
        if (4 * pixels <= options.PixelBudget)
        {
            // FloatPlane.DoubleSize puts pixel x of the large image at x / 2 of the input.
            return (ToPlane(image).DoubleSize(), new Mapping(0.5, 0), 2 * options.InputSigma);
        }
        var scaled = AreaResampler.ToPixelBudget(image, options.PixelBudget);
        return (ToPlane(scaled.Image), new Mapping(scaled.Scale, 0.5 * scaled.Scale - 0.5), options.InputSigma);
    }

    private static FloatPlane ToPlane(GrayImage image)
    {
        var plane = new FloatPlane(image.Width, image.Height);
        var src = image.Pixels;
        var dst = plane.Data;
        for (int i = 0; i < dst.Length; i++)
        {
            dst[i] = src[i] * (1f / 255f);
        }
        return plane;
    }

    /// <summary>
    /// Deviation of white noise (deviation <paramref name="sigmaNoise"/> per pixel) after the
    /// difference of Gaussians of deviations s1 &lt; s2: the continuous approximation
    /// sigma^2 (1 / (4 pi s1^2) + 1 / (4 pi s2^2) - 1 / (pi (s1^2 + s2^2))).
    /// </summary>
    public static double DifferenceNoise(double sigmaNoise, double s1, double s2)
    {
        double v = 1 / (4 * Math.PI * s1 * s1) + 1 / (4 * Math.PI * s2 * s2) - 1 / (Math.PI * (s1 * s1 + s2 * s2));
        return sigmaNoise * Math.Sqrt(Math.Max(0, v));
    }

    private static ScaleSpaceFeatureSet Describe(ScaleSpaceOptions options, List<FloatPlane[]> gaussians, Mapping mapping, List<Candidate> candidates)
    {
        // Strongest first; ties by position so the order never depends on anything but the pixels.
        var chosen = candidates
            .OrderByDescending(c => c.Point.Response).ThenBy(c => c.Octave).ThenBy(c => c.Point.Y).ThenBy(c => c.Point.X)
            .Take(options.MaxFeatures)
            .ToList();
        // Described layer by layer, so one layer's gradient directions are held at a time; assembled in the chosen order.
        var angleCounts = new int[chosen.Count];
        var allAngles = new float[chosen.Count * MaxAnglesPerPoint];
        var allDescriptors = new byte[chosen.Count * MaxAnglesPerPoint * GradientHistogramDescriptor.Length];
        foreach (var group in Enumerable.Range(0, chosen.Count).GroupBy(i => (chosen[i].Octave, chosen[i].Layer)))
        {
            var directions = new GradientDirections(gaussians[group.Key.Octave][group.Key.Layer - 1]);
            foreach (int i in group)
            {
                var p = chosen[i].Point;
                var angles = allAngles.AsSpan(i * MaxAnglesPerPoint, MaxAnglesPerPoint);
                angleCounts[i] = DominantOrientations.Find(directions, p.X, p.Y, p.Sigma, angles);
                for (int a = 0; a < angleCounts[i]; a++)
                {
                    GradientHistogramDescriptor.Compute(directions, p.X, p.Y, p.Sigma, angles[a],
                        allDescriptors.AsSpan((i * MaxAnglesPerPoint + a) * GradientHistogramDescriptor.Length, GradientHistogramDescriptor.Length));
                }
            }
        }
        var keypoints = new List<ScaleSpaceKeypoint>(chosen.Count);
        var descriptors = new List<byte>(chosen.Count * GradientHistogramDescriptor.Length);
        for (int i = 0; i < chosen.Count; i++)
        {
            var (p, o, _) = chosen[i];
            double step = Math.Pow(2, o);
            for (int a = 0; a < angleCounts[i]; a++)
            {
                double x = p.X * step * mapping.Scale + mapping.Offset, y = p.Y * step * mapping.Scale + mapping.Offset;
                keypoints.Add(new ScaleSpaceKeypoint((float)x, (float)y, (float)(p.Sigma * step * mapping.Scale), allAngles[i * MaxAnglesPerPoint + a], p.Response));
                descriptors.AddRange(allDescriptors.AsSpan((i * MaxAnglesPerPoint + a) * GradientHistogramDescriptor.Length, GradientHistogramDescriptor.Length));
            }
        }
        return new ScaleSpaceFeatureSet([.. keypoints], [.. descriptors]);
    }
}
