namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// Scale-space keypoints of one image with their descriptors
/// (<see cref="GradientHistogramDescriptor.Length"/> bytes each, one after another).
/// </summary>
public sealed class ScaleSpaceFeatureSet
{
    public ScaleSpaceFeatureSet(ScaleSpaceKeypoint[] keypoints, byte[] descriptors)
    {
        ArgumentNullException.ThrowIfNull(keypoints);
        ArgumentNullException.ThrowIfNull(descriptors);
        if (descriptors.Length != keypoints.Length * GradientHistogramDescriptor.Length)
        {
            throw new ArgumentException("Keypoints and descriptors disagree in count.");
        }
        Keypoints = keypoints;
        Descriptors = descriptors;
    }

    public ScaleSpaceKeypoint[] Keypoints { get; }

    public byte[] Descriptors { get; }

    public int Count => Keypoints.Length;

    public ReadOnlySpan<byte> Descriptor(int index) =>
        Descriptors.AsSpan(index * GradientHistogramDescriptor.Length, GradientHistogramDescriptor.Length);
}
