namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// The gradient-histogram descriptor of Lowe (IJCV 2004, section 6): 4 x 4 cells of 8
/// orientations over a window of 4 x 3 keypoint scales turned to the keypoint's direction,
/// samples weighted by a Gaussian of half the window and spread over neighbouring cells and
/// orientations (trilinear); normalised, clipped at 0.2 and normalised again. Then the square
/// root of the L1-normalised vector (RootSIFT, Arandjelovic and Zisserman, CVPR 2012), so that
/// Euclidean distance compares like the Hellinger kernel; stored as bytes (255 = 1).
/// </summary>
public static class GradientHistogramDescriptor
{
    public const int Cells = 4;
    public const int Orientations = 8;
    public const int Length = Cells * Cells * Orientations;
    private const double CellWidthInScales = 3;
    private const double Clip = 0.2;

    public static void Compute(GradientDirections directions, float x, float y, double sigma, float angle, Span<byte> output)
    {
        ArgumentNullException.ThrowIfNull(directions);
        var image = directions.Plane;
        const int d = Cells, n = Orientations;
        Span<double> hist = stackalloc double[(d + 2) * (d + 2) * (n + 2)];
        hist.Clear();
        double cellWidth = CellWidthInScales * sigma;
        int radius = (int)Math.Round(cellWidth * Math.Sqrt(2) * (d + 1) * 0.5);
        radius = Math.Min(radius, (int)Math.Sqrt((double)image.Width * image.Width + (double)image.Height * image.Height));
        double cos = Math.Cos(angle) / cellWidth, sin = Math.Sin(angle) / cellWidth;
        double expScale = -1.0 / (d * d * 0.5);
        double binsPerRad = n / (2 * Math.PI);
        int cx = (int)MathF.Round(x), cy = (int)MathF.Round(y);
        for (int i = -radius; i <= radius; i++)
        {
            for (int j = -radius; j <= radius; j++)
            {
                // The sample's offset turned by -angle, in cell widths.
                double cRot = j * cos + i * sin, rRot = -j * sin + i * cos;
                double rBin = rRot + d / 2.0 - 0.5, cBin = cRot + d / 2.0 - 0.5;
                if (rBin <= -1 || rBin >= d || cBin <= -1 || cBin >= d || !image.IsInterior(cx + j, cy + i))
                {
                    continue;
                }
                var (dx, dy) = image.CentralGradient(cx + j, cy + i);
                double magnitude = Math.Sqrt(dx * dx + dy * dy) * Math.Exp((cRot * cRot + rRot * rRot) * expScale);
                double oBin = (directions.At(cx + j, cy + i, dx, dy) - angle) * binsPerRad;
                Accumulate(hist, rBin, cBin, oBin, magnitude);
            }
        }
        Finish(hist, output);
    }

    private static void Accumulate(Span<double> hist, double rBin, double cBin, double oBin, double magnitude)
    {
        const int d = Cells, n = Orientations;
        int r0 = (int)Math.Floor(rBin), c0 = (int)Math.Floor(cBin), o0 = (int)Math.Floor(oBin);
        double fr = rBin - r0, fc = cBin - c0, fo = oBin - o0;
        o0 = ((o0 % n) + n) % n;
        for (int dr = 0; dr <= 1; dr++)
        {
            double vr = magnitude * (dr == 0 ? 1 - fr : fr);
            for (int dc = 0; dc <= 1; dc++)
            {
                double vc = vr * (dc == 0 ? 1 - fc : fc);
                int idx = ((r0 + 1 + dr) * (d + 2) + c0 + 1 + dc) * (n + 2) + o0;
                hist[idx] += vc * (1 - fo);
                hist[idx + 1] += vc * fo;
            }
        }
    }

    private static void Finish(ReadOnlySpan<double> hist, Span<byte> output)
    {
        const int d = Cells, n = Orientations;
        Span<double> v = stackalloc double[Length];
        for (int r = 0; r < d; r++)
        {
            for (int c = 0; c < d; c++)
            {
                int idx = ((r + 1) * (d + 2) + c + 1) * (n + 2);
                for (int o = 0; o < n; o++)
                {
                    v[(r * d + c) * n + o] = hist[idx + o] + (o == 0 ? hist[idx + n] : 0) + (o == 1 ? hist[idx + n + 1] : 0);
                }
            }
        }
        double norm = 0;
        foreach (double e in v)
        {
            norm += e * e;
        }
        double limit = Clip * Math.Sqrt(norm);
        double l1 = 0;
        for (int i = 0; i < v.Length; i++)
        {
            v[i] = Math.Min(v[i], limit);
            l1 += v[i];
        }
        for (int i = 0; i < v.Length; i++)
        {
            output[i] = l1 > 0 ? (byte)Math.Min(255, Math.Round(255 * Math.Sqrt(v[i] / l1))) : (byte)0;
        }
    }
}
