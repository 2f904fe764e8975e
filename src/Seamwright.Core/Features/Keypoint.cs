using System.Runtime.InteropServices;

namespace Seamwright.Core.Features;

/// <summary>
/// A detected corner. Coordinates are pixels of the image the detector ran on (pixel centres at
/// integers); <see cref="Scale"/> is the pyramid factor of the level it came from (1 at level 0),
/// so one pixel of that level spans <see cref="Scale"/> pixels of the input image.
/// </summary>
[StructLayout(LayoutKind.Sequential)]
public readonly record struct Keypoint(float X, float Y, float Scale, float Angle, float Response, int Level);
