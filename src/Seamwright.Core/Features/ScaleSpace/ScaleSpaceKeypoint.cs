namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// A scale-space keypoint. <see cref="X"/>, <see cref="Y"/> in pixels of the image given to the
/// detector (pixel centres at integers), <see cref="Sigma"/> the blob's scale in those pixels,
/// <see cref="Angle"/> the dominant gradient direction in radians, <see cref="Response"/> the
/// interpolated |difference of Gaussians|.
/// </summary>
public readonly record struct ScaleSpaceKeypoint(float X, float Y, float Sigma, float Angle, float Response);
