using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// Each motion model as a linear parameterisation of the 3x3 matrix with h33 = 1: every parameter
/// adds a fixed multiple of some entries. One Levenberg-Marquardt and one covariance then serve
/// all four models through the chain rule d(u, v)/dp = d(u, v)/dH * dH/dp.
/// </summary>
internal static class ModelParameterization
{
    public static int Dof(MotionModel model) => model switch
    {
        MotionModel.Translation => 2,
        MotionModel.Similarity => 4,
        MotionModel.Affine => 6,
        MotionModel.Homography => 8,
        _ => throw new ArgumentOutOfRangeException(nameof(model)),
    };

    /// <summary>Parameters of a transform whose m33 is 1 (entries outside the family are dropped).</summary>
    public static void ToParameters(MotionModel model, in Transform2D h, Span<double> p)
    {
        switch (model)
        {
            case MotionModel.Translation:
                p[0] = h.M13; p[1] = h.M23;
                break;
            case MotionModel.Similarity:
                p[0] = (h.M11 + h.M22) / 2; p[1] = (h.M21 - h.M12) / 2; p[2] = h.M13; p[3] = h.M23;
                break;
            case MotionModel.Affine:
                p[0] = h.M11; p[1] = h.M12; p[2] = h.M13; p[3] = h.M21; p[4] = h.M22; p[5] = h.M23;
                break;
            default:
                p[0] = h.M11; p[1] = h.M12; p[2] = h.M13; p[3] = h.M21; p[4] = h.M22; p[5] = h.M23; p[6] = h.M31; p[7] = h.M32;
                break;
        }
    }

    public static Transform2D FromParameters(MotionModel model, ReadOnlySpan<double> p) => model switch
    {
        MotionModel.Translation => new(1, 0, p[0], 0, 1, p[1], 0, 0, 1),
        MotionModel.Similarity => new(p[0], -p[1], p[2], p[1], p[0], p[3], 0, 0, 1),
        MotionModel.Affine => new(p[0], p[1], p[2], p[3], p[4], p[5], 0, 0, 1),
        _ => new(p[0], p[1], p[2], p[3], p[4], p[5], p[6], p[7], 1),
    };

    /// <summary>
    /// Mapped point (u, v) of (x, y) and its derivatives with respect to the parameters.
    /// Returns false when the point maps behind the viewer (w &lt;= 0).
    /// </summary>
    public static bool MapWithJacobian(MotionModel model, in Transform2D h, double x, double y,
        out double u, out double v, Span<double> du, Span<double> dv)
    {
        double w = h.M31 * x + h.M32 * y + h.M33;
        if (!(w > 0))
        {
            u = v = double.NaN;
            return false;
        }
        double iw = 1 / w;
        u = (h.M11 * x + h.M12 * y + h.M13) * iw;
        v = (h.M21 * x + h.M22 * y + h.M23) * iw;
        FillDerivatives(model, iw, x * iw, y * iw, u, v, du, dv);
        return double.IsFinite(u) && double.IsFinite(v);
    }

    /// <summary>
    /// Derivatives of the mapped point (u, v) with respect to the parameters, given 1/w and the
    /// point divided by w: row u into du, row v into dv. Shared with the set alignment.
    /// </summary>
    internal static void FillDerivatives(MotionModel model, double iw, double xw, double yw, double u, double v, Span<double> du, Span<double> dv)
    {
        switch (model)
        {
            case MotionModel.Translation:
                du[0] = iw; du[1] = 0;
                dv[0] = 0; dv[1] = iw;
                break;
            case MotionModel.Similarity:
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
}
