using Seamwright.Core.Imaging;

namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>One simulated camera tilt: the image compressed by <see cref="Tilt"/> across the direction at <see cref="Angle"/> radians.</summary>
public readonly record struct AffineView(double Tilt, double Angle);

/// <summary>
/// Affine view synthesis (Morel and Yu, "ASIFT: A New Framework for Fully Affine Invariant Image
/// Comparison", SIAM J. Imaging Sciences 2009): the views a camera tilted away from the image would
/// see, so a scale- and rotation-invariant detector also matches images taken from very different
/// angles. Tilts are powers of the square root of two; for each tilt t the longitudes run in steps
/// of 72 / t degrees over half a turn, as in the paper. A view is the image rotated by the
/// longitude onto a canvas that holds all of it, blurred along x by 0.8 sqrt(t^2 - 1) (the paper's
/// anti-aliasing) and compressed along x by t.
/// </summary>
public static class AffineViews
{
    /// <summary>The simulated views for tilts sqrt(2)^1 .. sqrt(2)^<paramref name="tilts"/> (the untilted image is not among them).</summary>
    public static IReadOnlyList<AffineView> Plan(int tilts)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(tilts, 1);
        var views = new List<AffineView>();
        for (int k = 1; k <= tilts; k++)
        {
            double t = Math.Pow(Math.Sqrt(2), k);
            double step = 72.0 / t;
            for (double deg = 0; deg < 180 - 1e-9; deg += step)
            {
                views.Add(new AffineView(t, deg * Math.PI / 180));
            }
        }
        return views;
    }

    /// <summary>A rendered view and how its pixels map back to the source image.</summary>
    public sealed record Rendered(GrayImage Image, AffineView View, double CanvasCentreX, double CanvasCentreY, double SourceCentreX, double SourceCentreY)
    {
        /// <summary>The source pixel a view pixel shows (pixel centres at integers on both sides).</summary>
        public (double X, double Y) ToSource(double x, double y)
        {
            double t = View.Tilt;
            double u = x * t + 0.5 * (t - 1) - CanvasCentreX, v = y - CanvasCentreY;
            double c = Math.Cos(View.Angle), s = Math.Sin(View.Angle);
            // The canvas is the source rotated by the angle: canvas = R (source - centre) + canvas centre.
            return (c * u + s * v + SourceCentreX, -s * u + c * v + SourceCentreY);
        }
    }

    public static Rendered Render(GrayImage source, AffineView view)
    {
        ArgumentNullException.ThrowIfNull(source);
        if (!(view.Tilt >= 1) || !double.IsFinite(view.Tilt) || !double.IsFinite(view.Angle))
        {
            throw new ArgumentOutOfRangeException(nameof(view), view, "A view needs a finite tilt of at least 1 and a finite angle.");
        }
        double c = Math.Cos(view.Angle), s = Math.Sin(view.Angle);
        int cw = Math.Max(1, (int)Math.Ceiling(Math.Abs(source.Width * c) + Math.Abs(source.Height * s)));
        int ch = Math.Max(1, (int)Math.Ceiling(Math.Abs(source.Width * s) + Math.Abs(source.Height * c)));
        double scx = 0.5 * (source.Width - 1), scy = 0.5 * (source.Height - 1);
        double ccx = 0.5 * (cw - 1), ccy = 0.5 * (ch - 1);
        float fill = Mean(source);
        var canvas = new float[cw * ch];
        for (int y = 0; y < ch; y++)
        {
            double v = y - ccy;
            for (int x = 0; x < cw; x++)
            {
                double u = x - ccx;
                canvas[y * cw + x] = Bilinear(source, c * u + s * v + scx, -s * u + c * v + scy, fill);
            }
        }
        int vw = Math.Max(1, (int)Math.Floor(cw / view.Tilt));
        var pixels = new byte[vw * ch];
        var blurred = new float[cw];
        var kernel = view.Tilt > 1 ? GaussianBlur.Kernel(0.8 * Math.Sqrt(view.Tilt * view.Tilt - 1)) : [1f];
        int radius = kernel.Length / 2;
        for (int y = 0; y < ch; y++)
        {
            var row = canvas.AsSpan(y * cw, cw);
            for (int x = 0; x < cw; x++)
            {
                float sum = 0;
                for (int k = -radius; k <= radius; k++)
                {
                    sum += kernel[k + radius] * row[Math.Clamp(x + k, 0, cw - 1)];
                }
                blurred[x] = sum;
            }
            for (int x = 0; x < vw; x++)
            {
                double fx = x * view.Tilt + 0.5 * (view.Tilt - 1);
                int x0 = Math.Min((int)fx, cw - 1), x1 = Math.Min(x0 + 1, cw - 1);
                double w = fx - x0;
                double value = (1 - w) * blurred[x0] + w * blurred[x1];
                pixels[y * vw + x] = (byte)Math.Clamp((int)Math.Round(value), 0, 255);
            }
        }
        return new Rendered(new GrayImage(vw, ch, pixels), view, ccx, ccy, scx, scy);
    }

    private static float Bilinear(GrayImage image, double x, double y, float fill)
    {
        if (x < -0.5 || y < -0.5 || x > image.Width - 0.5 || y > image.Height - 0.5)
        {
            return fill;
        }
        x = Math.Clamp(x, 0, image.Width - 1);
        y = Math.Clamp(y, 0, image.Height - 1);
        int x0 = Math.Min((int)x, image.Width - 1), y0 = Math.Min((int)y, image.Height - 1);
        int x1 = Math.Min(x0 + 1, image.Width - 1), y1 = Math.Min(y0 + 1, image.Height - 1);
        double wx = x - x0, wy = y - y0;
        double top = (1 - wx) * image[x0, y0] + wx * image[x1, y0];
        double bottom = (1 - wx) * image[x0, y1] + wx * image[x1, y1];
        return (float)((1 - wy) * top + wy * bottom);
    }

    private static float Mean(GrayImage image)
    {
        long sum = 0;
        foreach (byte b in image.Pixels)
        {
            sum += b;
        }
        return (float)sum / image.Pixels.Length;
    }
}
