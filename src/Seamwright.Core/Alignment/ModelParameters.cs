using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>
/// Parameters of a transform in one motion model, with m33 fixed to 1, as its family defines them
/// (<see cref="MotionFamily"/>: e.g. similarity (a, b, tx, ty) for [[a, -b, tx], [b, a, ty]]).
/// </summary>
internal static class ModelParameters
{
    public static int Count(MotionModel model) => MotionFamily.Of(model).ParameterCount;

    /// <summary>Nearest parameters of the model to a transform (the transform is scaled to m33 = 1 first).</summary>
    public static void FromTransform(MotionModel model, Transform2D t, Span<double> p) =>
        MotionFamily.Of(model).ToParameters(t.Normalized(), p);

    public static Transform2D ToTransform(MotionModel model, ReadOnlySpan<double> p) => MotionFamily.Of(model).FromParameters(p);

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
        MotionFamily.Of(model).FillDerivatives(iw, x * iw, y * iw, u, v, du, dv);
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
