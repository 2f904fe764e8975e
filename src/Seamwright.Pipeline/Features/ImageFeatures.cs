using Seamwright.Core.Features;
using Seamwright.Core.Geometry;

namespace Seamwright.Pipeline.Features;

/// <summary>
/// The features of one image, self-contained so a pair can be processed (and a feature cache
/// written) without either image in memory. Keypoint coordinates are full-resolution pixels of
/// the image as displayed (pixel centres at integers); <see cref="Keypoint.Scale"/> is full-resolution
/// pixels per pixel of the pyramid level the corner came from. Each keypoint carries a
/// full-resolution patch (side 2 * PatchRadius + 1) centred on its rounded position, for the
/// re-localisation of tie points.
/// </summary>
public sealed class ImageFeatures
{
    public ImageFeatures(ImageSize fullSize, ImageSize workingSize, double workingScale, Keypoint[] keypoints, Descriptor256[] descriptors,
        int patchRadius, byte[] patches, string patternVersion, string settingsFingerprint)
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
    }

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

    public static int PatchCentre(float coordinate) => (int)MathF.Round(coordinate);

    public FullResolutionPatch Patch(int index)
    {
        int n = PatchSide * PatchSide;
        var k = Keypoints[index];
        return new FullResolutionPatch(Patches.AsSpan(index * n, n), PatchCentre(k.X), PatchCentre(k.Y), PatchRadius);
    }
}
