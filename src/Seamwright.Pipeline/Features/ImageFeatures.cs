using Seamwright.Core.Features;
using Seamwright.Core.Features.ScaleSpace;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;

namespace Seamwright.Pipeline.Features;

/// <summary>
/// The features of one image, self-contained so a pair can be processed (and a feature cache
/// written) without either image in memory. Keypoint coordinates are full-resolution pixels of
/// the image as displayed (pixel centres at integers); <see cref="Keypoint.Scale"/> is full-resolution
/// pixels per pixel of the pyramid level the corner came from. Each keypoint carries a
/// full-resolution patch (side 2 * PatchRadius + 1) centred on its rounded position, for the
/// re-localisation of tie points. <see cref="Compact"/> is a gray copy of at most
/// <see cref="CompactPixels"/> pixels for the scale-space path (computed only for pairs that need it,
/// then kept with these features, <see cref="ScaleSpace"/>).
/// </summary>
public sealed class ImageFeatures
{
    public ImageFeatures(ImageSize fullSize, ImageSize workingSize, double workingScale, Keypoint[] keypoints, Descriptor256[] descriptors,
        int patchRadius, byte[] patches, string patternVersion, string settingsFingerprint, ScaledImage? compact = null, GrayImage? compactMask = null)
    {
        ArgumentNullException.ThrowIfNull(keypoints);
        ArgumentNullException.ThrowIfNull(descriptors);
        ArgumentNullException.ThrowIfNull(patches);
        ArgumentNullException.ThrowIfNull(patternVersion);
        ArgumentNullException.ThrowIfNull(settingsFingerprint);
        int side = 2 * patchRadius + 1;
        if (descriptors.Length != keypoints.Length || patches.Length != (long)keypoints.Length * side * side)
        {
            throw new ArgumentException("Keypoints, descriptors and patches disagree in count.");
        }
        if (!double.IsFinite(workingScale) || workingScale < 1)
        {
            throw new ArgumentOutOfRangeException(nameof(workingScale), workingScale, "The working scale is full-resolution pixels per working pixel (at least 1).");
        }
        FullSize = fullSize;
        WorkingScale = workingScale;
        WorkingSize = workingSize;
        Keypoints = keypoints;
        Descriptors = descriptors;
        PatchRadius = patchRadius;
        Patches = patches;
        PatternVersion = patternVersion;
        SettingsFingerprint = settingsFingerprint;
        if (compactMask is not null && (compact is null || compactMask.Width != compact.Image.Width || compactMask.Height != compact.Image.Height))
        {
            throw new ArgumentException("The compact mask must have the compact copy's size.");
        }
        Compact = compact;
        CompactMask = compactMask;
    }

    /// <summary>
    /// Pixels of the compact gray copy kept for the scale-space path. Judgement: at about a
    /// megapixel the detector works on the copy as it is (it doubles only images of at most half a
    /// megapixel, ScaleSpaceOptions.PixelBudget), which keeps its cost near half a second per image.
    /// </summary>
    public const long CompactPixels = 1_000_000;

    /// <summary>Size of the image as displayed (after the EXIF orientation), full resolution.</summary>
    public ImageSize FullSize { get; }

    /// <summary>Size of the analysis image the corners were detected on.</summary>
    public ImageSize WorkingSize { get; }

    /// <summary>
    /// Full-resolution pixels per working pixel, the same on both axes (1 when no downscale was
    /// needed): a working coordinate x is the full-resolution coordinate (x + 0.5) * scale - 0.5.
    /// </summary>
    public double WorkingScale { get; }

    public Keypoint[] Keypoints { get; }

    public Descriptor256[] Descriptors { get; }

    public int PatchRadius { get; }

    public int PatchSide => 2 * PatchRadius + 1;

    /// <summary>Patches of all keypoints, one after another, row-major.</summary>
    public byte[] Patches { get; }

    public string PatternVersion { get; }

    public string SettingsFingerprint { get; }

    public int Count => Keypoints.Length;

    /// <summary>Gray copy of the image (area-averaged to at most <see cref="CompactPixels"/>); Scale is full-resolution pixels per copy pixel. Null for features made without one.</summary>
    public ScaledImage? Compact { get; }

    /// <summary>The feature mask at the compact copy's size (255 = use, 0 = excluded); null when nothing is excluded.</summary>
    public GrayImage? CompactMask { get; }

    private readonly LastComputed<ScaleSpaceOptions> scaleSpace = new();
    private readonly LastComputed<(ScaleSpaceOptions, int, int)> affine = new();

    /// <summary>
    /// The pooled scale-space features of simulated tilted views of <see cref="Compact"/>, in its pixels
    /// (<see cref="AffineViewDetector"/>), computed on first use and kept like <see cref="ScaleSpace"/>.
    /// </summary>
    public ScaleSpaceFeatureSet? AffineViewFeatures(ScaleSpaceOptions options, int tilts, int featuresPerView)
    {
        ArgumentNullException.ThrowIfNull(options);
        if (Compact is null)
        {
            return null;
        }
        return affine.Get((options, tilts, featuresPerView), () => Unmasked(AffineViewDetector.Detect(Compact.Image, options, tilts, featuresPerView)));
    }

    /// <summary>
    /// The scale-space features of <see cref="Compact"/> (in its pixels), computed on first use and
    /// kept while these features are held; null without a compact copy. The same for every caller
    /// (the detector is deterministic), whichever thread computes it.
    /// </summary>
    public ScaleSpaceFeatureSet? ScaleSpace(ScaleSpaceOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        if (Compact is null)
        {
            return null;
        }
        return scaleSpace.Get(options, () => Unmasked(ScaleSpaceDetector.Detect(Compact.Image, options)));
    }

    /// <summary>The features computed for the last key asked for, kept until another key is asked for; one computation at a time.</summary>
    private sealed class LastComputed<TKey> where TKey : IEquatable<TKey>
    {
        private readonly Lock gate = new();
        private (TKey Key, ScaleSpaceFeatureSet Set)? held;

        public ScaleSpaceFeatureSet Get(TKey key, Func<ScaleSpaceFeatureSet> compute)
        {
            lock (gate)
            {
                if (held is not { } h || !h.Key.Equals(key))
                {
                    held = (key, compute());
                }
                return held.Value.Set;
            }
        }
    }

    /// <summary>The keypoints outside the excluded regions (all of them without a mask), in their order.</summary>
    private ScaleSpaceFeatureSet Unmasked(ScaleSpaceFeatureSet set)
    {
        if (CompactMask is not { } mask)
        {
            return set;
        }
        var keep = Enumerable.Range(0, set.Count).Where(i =>
        {
            var k = set.Keypoints[i];
            int x = Math.Clamp((int)MathF.Round(k.X), 0, mask.Width - 1), y = Math.Clamp((int)MathF.Round(k.Y), 0, mask.Height - 1);
            return mask[x, y] != 0;
        }).ToArray();
        int n = GradientHistogramDescriptor.Length;
        var descriptors = new byte[keep.Length * n];
        for (int j = 0; j < keep.Length; j++)
        {
            set.Descriptor(keep[j]).CopyTo(descriptors.AsSpan(j * n, n));
        }
        return new ScaleSpaceFeatureSet([.. keep.Select(i => set.Keypoints[i])], descriptors);
    }

    public static int PatchCentre(float coordinate) => (int)MathF.Round(coordinate);

    public FullResolutionPatch Patch(int index)
    {
        int n = PatchSide * PatchSide;
        var k = Keypoints[index];
        return new FullResolutionPatch(Patches.AsSpan(index * n, n), PatchCentre(k.X), PatchCentre(k.Y), PatchRadius);
    }
}
