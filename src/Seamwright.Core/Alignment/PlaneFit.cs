using System.Globalization;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>
/// Whether an image mapped into the reference still lies on the reference plane in a usable way:
/// every corner in front of it (w &gt; 0 relative to the image's tie points), not close to its
/// horizon, not folded over, and not stretched beyond a bound. A wide or all-round sequence from a
/// rotating camera fails these far from the reference, where one plane cannot hold it.
/// </summary>
internal static class PlaneFit
{
    /// <summary>Null when the placement fits; otherwise the reason in words.</summary>
    public static string? Check(in Transform2D toReference, ImageSize size, (double X, double Y) anchor, AlignmentOptions options)
    {
        double wAnchor = toReference.W(anchor.X, anchor.Y);
        if (!(Math.Abs(wAnchor) > 0) || !toReference.IsFinite)
        {
            return "its transform into the reference is degenerate";
        }
        if (wAnchor < 0)
        {
            return "it lies behind the reference plane (its tie points map to w < 0: turned more than a quarter turn from the reference?)";
        }
        var corners = Transform2D.Corners(size.Width, size.Height);
        double worst = double.PositiveInfinity;
        foreach (var (x, y) in corners)
        {
            worst = Math.Min(worst, toReference.W(x, y) / wAnchor);
        }
        if (worst <= 0)
        {
            return "part of it falls behind the reference plane (w <= 0 at a corner)";
        }
        if (worst < options.MinDepthRatio)
        {
            return string.Create(CultureInfo.InvariantCulture,
                $"a corner lies near the horizon of the reference plane (depth ratio {worst:0.###}, minimum {options.MinDepthRatio})");
        }
        Span<double> mx = stackalloc double[4], my = stackalloc double[4];
        for (int i = 0; i < 4; i++)
        {
            (mx[i], my[i]) = toReference.Apply(corners[i].X, corners[i].Y);
        }
        int sign = 0;
        for (int i = 0; i < 4; i++)
        {
            int j = (i + 1) & 3, k = (i + 2) & 3;
            double cross = (mx[j] - mx[i]) * (my[k] - my[j]) - (my[j] - my[i]) * (mx[k] - mx[j]);
            int s = Math.Sign(cross);
            if (s == 0 || (sign != 0 && s != sign))
            {
                return "it folds over when mapped into the reference (corners no longer convex)";
            }
            sign = s;
        }
        if (sign < 0)
        {
            return "it is mirrored when mapped into the reference";
        }
        double area = 0;
        for (int i = 0; i < 4; i++)
        {
            int j = (i + 1) & 3;
            area += mx[i] * my[j] - mx[j] * my[i];
        }
        double ratio = Math.Abs(area / 2) / Math.Max(1.0, (double)(size.Width - 1) * (size.Height - 1));
        if (ratio > options.MaxAreaRatio || ratio < 1 / options.MaxAreaRatio)
        {
            return string.Create(CultureInfo.InvariantCulture,
                $"its area changes by a factor of {ratio:0.##} when mapped into the reference (allowed 1/{options.MaxAreaRatio:0.#} to {options.MaxAreaRatio:0.#})");
        }
        return null;
    }
}
