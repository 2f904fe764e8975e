namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>An extremum of an octave's differences of Gaussians, refined: position in octave pixels, layer (fractional) and response.</summary>
public readonly record struct ScaleExtremum(int Layer, float X, float Y, float LayerOffset, float Response);

/// <summary>
/// Finds the local extrema of the differences of Gaussians over space and scale, refines each by
/// fitting a quadratic to its 3 x 3 x 3 neighbourhood (Brown and Lowe, BMVC 2002), and drops low
/// contrast ones and those on edges (ratio of principal curvatures, Lowe, IJCV 2004, section 4).
/// </summary>
public static class ExtremumLocator
{
    private const int Border = 5;
    private const int MaxSteps = 5;

    /// <param name="contrasts">Smallest |response| of a refined extremum per difference layer (0..1 intensity units).</param>
    public static List<ScaleExtremum> Find(GaussianOctave octave, double[] contrasts, double edgeRatio)
    {
        ArgumentNullException.ThrowIfNull(octave);
        var found = new List<ScaleExtremum>();
        var d = octave.Differences;
        int w = octave.Width, h = octave.Height;
        if (w <= 2 * Border || h <= 2 * Border)
        {
            return found;
        }
        ArgumentNullException.ThrowIfNull(contrasts);
        for (int layer = 1; layer < d.Length - 1; layer++)
        {
            float pre = (float)(0.5 * contrasts[layer]);
            float[] below = d[layer - 1].Data, here = d[layer].Data, above = d[layer + 1].Data;
            for (int y = Border; y < h - Border; y++)
            {
                int row = y * w;
                for (int x = Border; x < w - Border; x++)
                {
                    int i = row + x;
                    float v = here[i];
                    if (Math.Abs(v) <= pre || !IsExtremum(below, here, above, i, w, v))
                    {
                        continue;
                    }
                    if (Refine(octave, layer, x, y, contrasts, edgeRatio) is { } e)
                    {
                        found.Add(e);
                    }
                }
            }
        }
        return found;
    }

    private static bool IsExtremum(float[] below, float[] here, float[] above, int i, int w, float v)
    {
        if (v > 0)
        {
            for (int dy = -w; dy <= w; dy += w)
            {
                for (int dx = -1; dx <= 1; dx++)
                {
                    int j = i + dy + dx;
                    if (below[j] > v || above[j] > v || (j != i && here[j] >= v))
                    {
                        return false;
                    }
                }
            }
            return true;
        }
        for (int dy = -w; dy <= w; dy += w)
        {
            for (int dx = -1; dx <= 1; dx++)
            {
                int j = i + dy + dx;
                if (below[j] < v || above[j] < v || (j != i && here[j] <= v))
                {
                    return false;
                }
            }
        }
        return true;
    }

    private static ScaleExtremum? Refine(GaussianOctave octave, int layer, int x, int y, double[] contrasts, double edgeRatio)
    {
        var d = octave.Differences;
        int w = octave.Width, h = octave.Height;
        double ox = 0, oy = 0, os = 0;
        double gx = 0, gy = 0, gs = 0;
        for (int step = 0; ; step++)
        {
            float[] b = d[layer - 1].Data, c = d[layer].Data, a = d[layer + 1].Data;
            int i = y * w + x;
            gx = 0.5 * (c[i + 1] - c[i - 1]);
            gy = 0.5 * (c[i + w] - c[i - w]);
            gs = 0.5 * (a[i] - b[i]);
            double v2 = 2.0 * c[i];
            double hxx = c[i + 1] + c[i - 1] - v2, hyy = c[i + w] + c[i - w] - v2, hss = a[i] + b[i] - v2;
            double hxy = 0.25 * (c[i + w + 1] - c[i + w - 1] - c[i - w + 1] + c[i - w - 1]);
            double hxs = 0.25 * (a[i + 1] - a[i - 1] - b[i + 1] + b[i - 1]);
            double hys = 0.25 * (a[i + w] - a[i - w] - b[i + w] + b[i - w]);
            if (!Solve(hxx, hxy, hxs, hyy, hys, hss, -gx, -gy, -gs, out ox, out oy, out os))
            {
                return null;
            }
            if (Math.Abs(ox) < 0.5 && Math.Abs(oy) < 0.5 && Math.Abs(os) < 0.5)
            {
                break;
            }
            if (step == MaxSteps - 1 || Math.Abs(ox) > w || Math.Abs(oy) > h)
            {
                return null;
            }
            x += (int)Math.Round(ox);
            y += (int)Math.Round(oy);
            layer += (int)Math.Round(os);
            if (layer < 1 || layer > d.Length - 2 || x < Border || x >= w - Border || y < Border || y >= h - Border)
            {
                return null;
            }
        }
        var cur = d[layer].Data;
        int k = y * w + x;
        double response = cur[k] + 0.5 * (gx * ox + gy * oy + gs * os);
        if (Math.Abs(response) < contrasts[layer])
        {
            return null;
        }
        double dxx = cur[k + 1] + cur[k - 1] - 2.0 * cur[k], dyy = cur[k + w] + cur[k - w] - 2.0 * cur[k];
        double dxy = 0.25 * (cur[k + w + 1] - cur[k + w - 1] - cur[k - w + 1] + cur[k - w - 1]);
        double tr = dxx + dyy, det = dxx * dyy - dxy * dxy;
        if (det <= 0 || tr * tr * edgeRatio >= (edgeRatio + 1) * (edgeRatio + 1) * det)
        {
            return null;
        }
        return new ScaleExtremum(layer, (float)(x + ox), (float)(y + oy), (float)os, (float)Math.Abs(response));
    }

    /// <summary>Solves the symmetric 3 x 3 system by Cramer's rule; false when it is singular.</summary>
    private static bool Solve(double a11, double a12, double a13, double a22, double a23, double a33,
        double b1, double b2, double b3, out double x1, out double x2, out double x3)
    {
        double c11 = a22 * a33 - a23 * a23, c12 = a13 * a23 - a12 * a33, c13 = a12 * a23 - a13 * a22;
        double det = a11 * c11 + a12 * c12 + a13 * c13;
        if (Math.Abs(det) < 1e-20)
        {
            x1 = x2 = x3 = 0;
            return false;
        }
        double c22 = a11 * a33 - a13 * a13, c23 = a12 * a13 - a11 * a23, c33 = a11 * a22 - a12 * a12;
        x1 = (c11 * b1 + c12 * b2 + c13 * b3) / det;
        x2 = (c12 * b1 + c22 * b2 + c23 * b3) / det;
        x3 = (c13 * b1 + c23 * b2 + c33 * b3) / det;
        return true;
    }
}
