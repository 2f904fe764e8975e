namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// The gradient direction atan2(dy, dx) of a plane's central differences, computed at most once per
/// pixel and kept: the directions and descriptors of neighbouring keypoints on one layer sample the
/// same pixels many times, and atan2 was the largest single cost of the detector (about a third of its
/// CPU samples, `perf` on `profile-scalespace`). Each value is exactly <see cref="Math.Atan2"/> of the
/// same arguments, so results do not change.
/// </summary>
public sealed class GradientDirections
{
    private readonly double[] _angles;

    public GradientDirections(FloatPlane plane)
    {
        ArgumentNullException.ThrowIfNull(plane);
        Plane = plane;
        _angles = new double[plane.Data.Length];
        Array.Fill(_angles, double.NaN);
    }

    public FloatPlane Plane { get; }

    /// <summary>atan2(dy, dx) at interior pixel (x, y), where (dx, dy) is its <see cref="FloatPlane.CentralGradient"/>.</summary>
    public double At(int x, int y, double dx, double dy)
    {
        int k = y * Plane.Width + x;
        double a = _angles[k];
        if (double.IsNaN(a))
        {
            a = Math.Atan2(dy, dx);
            _angles[k] = a;
        }
        return a;
    }
}
