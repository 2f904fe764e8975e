using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>
/// Parameters of a transform in one motion model, with m33 fixed to 1: translation (tx, ty),
/// similarity (a, b, tx, ty) for [[a, -b, tx], [b, a, ty]], affine (m11..m23), homography (m11..m32).
/// </summary>
internal static class ModelParameters
{
    public static int Count(MotionModel model) => model switch
    {
        MotionModel.Translation => 2,
        MotionModel.Similarity => 4,
        MotionModel.Affine => 6,
        _ => 8,
    };

    /// <summary>Nearest parameters of the model to a transform (the transform is scaled to m33 = 1 first).</summary>
    public static void FromTransform(MotionModel model, Transform2D t, Span<double> p)
    {
        var h = t.Normalized();
        switch (model)
        {
            case MotionModel.Translation:
                p[0] = h.M13; p[1] = h.M23;
                break;
            case MotionModel.Similarity:
                p[0] = 0.5 * (h.M11 + h.M22); p[1] = 0.5 * (h.M21 - h.M12); p[2] = h.M13; p[3] = h.M23;
                break;
            case MotionModel.Affine:
                p[0] = h.M11; p[1] = h.M12; p[2] = h.M13; p[3] = h.M21; p[4] = h.M22; p[5] = h.M23;
                break;
            default:
                p[0] = h.M11; p[1] = h.M12; p[2] = h.M13; p[3] = h.M21; p[4] = h.M22; p[5] = h.M23; p[6] = h.M31; p[7] = h.M32;
                break;
        }
    }

    public static Transform2D ToTransform(MotionModel model, ReadOnlySpan<double> p) => model switch
    {
        MotionModel.Translation => new(1, 0, p[0], 0, 1, p[1], 0, 0, 1),
        MotionModel.Similarity => new(p[0], -p[1], p[2], p[1], p[0], p[3], 0, 0, 1),
        MotionModel.Affine => new(p[0], p[1], p[2], p[3], p[4], p[5], 0, 0, 1),
        _ => new(p[0], p[1], p[2], p[3], p[4], p[5], p[6], p[7], 1),
    };

    /// <summary>
    /// Derivative of the mapped point t(x, y) with respect to the parameters: row 0 (u) into du,
    /// row 1 (v) into dv. <paramref name="t"/> must have m33 = 1 and be built from the parameters.
    /// </summary>
    public static void PointDerivative(MotionModel model, in Transform2D t, double x, double y, Span<double> du, Span<double> dv)
    {
        double w = t.M31 * x + t.M32 * y + t.M33;
        double iw = 1 / w;
        double u = (t.M11 * x + t.M12 * y + t.M13) * iw;
        double v = (t.M21 * x + t.M22 * y + t.M23) * iw;
        double xw = x * iw, yw = y * iw;
        switch (model)
        {
            case MotionModel.Translation:
                du[0] = iw; du[1] = 0;
                dv[0] = 0; dv[1] = iw;
                break;
            case MotionModel.Similarity:
                // d/da = d/dm11 + d/dm22; d/db = -d/dm12 + d/dm21.
                du[0] = xw; du[1] = -yw; du[2] = iw; du[3] = 0;
                dv[0] = yw; dv[1] = xw; dv[2] = 0; dv[3] = iw;
                break;
            case MotionModel.Affine:
                du[0] = xw; du[1] = yw; du[2] = iw; du[3] = 0; du[4] = 0; du[5] = 0;
                dv[0] = 0; dv[1] = 0; dv[2] = 0; dv[3] = xw; dv[4] = yw; dv[5] = iw;
                break;
            default:
                du[0] = xw; du[1] = yw; du[2] = iw; du[3] = 0; du[4] = 0; du[5] = 0; du[6] = -u * xw; du[7] = -u * yw;
                dv[0] = 0; dv[1] = 0; dv[2] = 0; dv[3] = xw; dv[4] = yw; dv[5] = iw; dv[6] = -v * xw; dv[7] = -v * yw;
                break;
        }
    }

    /// <summary>The 2x2 Jacobian of t at (x, y) with respect to the point: (a, b; c, d).</summary>
    public static (double A, double B, double C, double D) PointJacobian(in Transform2D t, double x, double y)
    {
        double w = t.M31 * x + t.M32 * y + t.M33;
        double u = (t.M11 * x + t.M12 * y + t.M13) / w;
        double v = (t.M21 * x + t.M22 * y + t.M23) / w;
        return ((t.M11 - u * t.M31) / w, (t.M12 - u * t.M32) / w, (t.M21 - v * t.M31) / w, (t.M22 - v * t.M32) / w);
    }
}
