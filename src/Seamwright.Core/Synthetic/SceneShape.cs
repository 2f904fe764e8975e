namespace Seamwright.Core.Synthetic;

internal enum ShapeKind
{
    Disc,
    Ring,
    Box,
    BoxOutline,
    Stroke,
}

/// <summary>
/// One drawn element of a procedural scene in scene units: a centre, half-sizes, a rotation,
/// a stroke width and a tone. Coverage uses a signed distance with a one-unit soft edge, so
/// shapes are anti-aliased at any view scale down to about one pixel per scene unit.
/// </summary>
internal readonly record struct SceneShape(
    ShapeKind Kind, double X, double Y, double HalfA, double HalfB, double Cos, double Sin, double StrokeWidth, double Tone)
{
    /// <summary>Radius beyond which the shape has no influence.</summary>
    public double Reach => Math.Sqrt(HalfA * HalfA + HalfB * HalfB) + StrokeWidth + 1;

    /// <summary>Composites the shape over <paramref name="under"/> at (x, y).</summary>
    public double Over(double x, double y, double under)
    {
        double dx = x - X;
        double dy = y - Y;
        double reach = Reach;
        if (dx * dx + dy * dy > reach * reach)
        {
            return under;
        }
        double d = SignedDistance(dx, dy);
        double coverage = Math.Clamp(0.5 - d, 0, 1);
        return under + coverage * (Tone - under);
    }

    private double SignedDistance(double dx, double dy)
    {
        double qx = Cos * dx + Sin * dy;
        double qy = -Sin * dx + Cos * dy;
        switch (Kind)
        {
            case ShapeKind.Disc:
                return Math.Sqrt(dx * dx + dy * dy) - HalfA;
            case ShapeKind.Ring:
                return Math.Abs(Math.Sqrt(dx * dx + dy * dy) - HalfA) - 0.5 * StrokeWidth;
            case ShapeKind.Box:
                return BoxDistance(qx, qy);
            case ShapeKind.BoxOutline:
                return Math.Abs(BoxDistance(qx, qy)) - 0.5 * StrokeWidth;
            default:
                // A segment of half-length HalfA along the rotated x axis.
                double t = Math.Clamp(qx, -HalfA, HalfA);
                double ex = qx - t;
                return Math.Sqrt(ex * ex + qy * qy) - 0.5 * StrokeWidth;
        }
    }

    private double BoxDistance(double qx, double qy)
    {
        double ax = Math.Abs(qx) - HalfA;
        double ay = Math.Abs(qy) - HalfB;
        double ox = Math.Max(ax, 0);
        double oy = Math.Max(ay, 0);
        return Math.Sqrt(ox * ox + oy * oy) + Math.Min(Math.Max(ax, ay), 0);
    }
}
