using Seamwright.Core.Geometry;

namespace Seamwright.Core.Synthetic;

/// <summary>Builders of the transforms used to make synthetic views with known ground truth.</summary>
public static class ViewTransforms
{
    /// <summary>
    /// Rotation by <paramref name="angle"/> (radians, counter-clockwise in a y-down image shown
    /// as clockwise) and scaling by <paramref name="scale"/> about (cx, cy), then a shift (tx, ty).
    /// </summary>
    public static Transform2D SimilarityAbout(double cx, double cy, double scale, double angle, double tx = 0, double ty = 0)
    {
        double c = scale * Math.Cos(angle);
        double s = scale * Math.Sin(angle);
        return new Transform2D(c, -s, cx - c * cx + s * cy + tx, s, c, cy - s * cx - c * cy + ty, 0, 0, 1);
    }

    /// <summary>
    /// The homography K R K^-1 from the pixels of a camera rotated by (yaw about the image y
    /// axis, pitch about x, roll about the optical axis; radians) to the pixels of the unrotated
    /// camera with the same intrinsics (focal length in pixels, principal point (cx, cy)).
    /// Exact for any scene seen by a camera rotating about its centre (Hartley and Zisserman,
    /// Multiple View Geometry, 2nd ed., section 8.4).
    /// </summary>
    public static Transform2D CameraRotation(double focal, double cx, double cy, double yaw, double pitch, double roll)
    {
        var k = new Transform2D(focal, 0, cx, 0, focal, cy, 0, 0, 1);
        var kInv = new Transform2D(1 / focal, 0, -cx / focal, 0, 1 / focal, -cy / focal, 0, 0, 1);
        double cyw = Math.Cos(yaw), syw = Math.Sin(yaw);
        double cp = Math.Cos(pitch), sp = Math.Sin(pitch);
        double cr = Math.Cos(roll), sr = Math.Sin(roll);
        var ry = new Transform2D(cyw, 0, syw, 0, 1, 0, -syw, 0, cyw);
        var rx = new Transform2D(1, 0, 0, 0, cp, -sp, 0, sp, cp);
        var rz = new Transform2D(cr, -sr, 0, sr, cr, 0, 0, 0, 1);
        // A ray d in the rotated camera is R d in the reference camera.
        var r = ry * rx * rz;
        return (k * r * kInv).Normalized();
    }
}
