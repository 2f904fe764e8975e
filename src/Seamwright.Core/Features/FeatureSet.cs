namespace Seamwright.Core.Features;

/// <summary>
/// Keypoints and their descriptors (same index), as contiguous arrays. Keypoint coordinates are
/// pixels of the image the extractor ran on (level 0 of the pyramid).
/// </summary>
public sealed record FeatureSet(Keypoint[] Keypoints, Descriptor256[] Descriptors)
{
    public int Count => Keypoints.Length;
}
