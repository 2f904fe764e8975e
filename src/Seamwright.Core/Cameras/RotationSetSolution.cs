using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>
/// One placed camera: a ray in its frame (x right, y down, z forward; pixel (u, v) is the ray
/// ((u - cx) / f, (v - cy) / f, 1) after removing the distortion) is <see cref="Rotation"/> times
/// it in the set's world frame.
/// </summary>
public sealed record CameraPose(int Index, Matrix3 Rotation, double FocalPx, double Cx, double Cy, LensDistortion Distortion)
{
    /// <summary>Unit world ray of a pixel.</summary>
    public (double X, double Y, double Z) Ray(double u, double v)
    {
        var (x, y) = Distortion.Undistort((u - Cx) / FocalPx, (v - Cy) / FocalPx);
        double n = Math.Sqrt(x * x + y * y + 1);
        return Rotation.Apply(x / n, y / n, 1 / n);
    }

    /// <summary>
    /// True when the ideal rays of every corner of a width x height image of this camera point into
    /// the half-space in front of <paramref name="reference"/> (then <see cref="ToCamera"/> maps the
    /// whole image with w &gt; 0; its scaling to m33 = 1 would hide a camera facing away).
    /// </summary>
    public bool InFrontOf(CameraPose reference, int width, int height)
    {
        ArgumentNullException.ThrowIfNull(reference);
        var r = reference.Rotation.Transpose() * Rotation;
        foreach (var (u, v) in Transform2D.Corners(width, height))
        {
            var (_, _, z) = r.Apply((u - Cx) / FocalPx, (v - Cy) / FocalPx, 1);
            if (!(z > 1e-9))
            {
                return false;
            }
        }
        return true;
    }

    /// <summary>Homography from this camera's pixels to <paramref name="reference"/>'s (distortion ignored): K_r R_r^T R K^-1.</summary>
    public Transform2D ToCamera(CameraPose reference)
    {
        ArgumentNullException.ThrowIfNull(reference);
        var r = reference.Rotation.Transpose() * Rotation;
        var kInv = new Transform2D(1 / FocalPx, 0, -Cx / FocalPx, 0, 1 / FocalPx, -Cy / FocalPx, 0, 0, 1);
        var k = new Transform2D(reference.FocalPx, 0, reference.Cx, 0, reference.FocalPx, reference.Cy, 0, 0, 1);
        var rt = new Transform2D(r.M11, r.M12, r.M13, r.M21, r.M22, r.M23, r.M31, r.M32, r.M33);
        return (k * rt * kInv).Normalized();
    }
}

/// <summary>Tie-point residuals of a rotation set, in pixels (focal length times the angle between the two rays).</summary>
public sealed record RotationResiduals(int TiePoints, int Links, double InitialRmsPx, double RmsPx, double MedianPx, double MaxPx, int Iterations);

/// <summary>A link left out of the rotation set, with the reason.</summary>
public sealed record LeftOutLink(int ImageA, int ImageB, string Reason);

/// <summary>The result of solving a camera-rotation set.</summary>
/// <param name="Poses">One per image; null when unplaced.</param>
/// <param name="Reasons">Why an image is unplaced (null when placed).</param>
/// <param name="Reference">The reference image (its rotation is the world before levelling).</param>
/// <param name="Residuals">Residual figures of the used links.</param>
/// <param name="LeftOut">Links left out by the re-check.</param>
/// <param name="LevellingDeg">Angle of the levelling rotation applied to the world, degrees (0 when off).</param>
/// <param name="FocalSources">How each camera's starting focal length was found, in words.</param>
public sealed record RotationSetSolution(
    CameraPose?[] Poses, string?[] Reasons, int Reference, RotationResiduals Residuals, LeftOutLink[] LeftOut,
    double LevellingDeg, string[] FocalSources)
{
    public int PlacedCount => Poses.Count(p => p is not null);

    /// <summary>Under <see cref="DistortionTerms.Auto"/>, which lens model was kept and why ("" otherwise).</summary>
    public string DistortionReason { get; init; } = "";
}
