using Seamwright.Core.Geometry;

namespace Seamwright.Core.Features;

/// <summary>
/// A square full-resolution patch around a keypoint: side 2 * Radius + 1, centred on the
/// integer pixel (CentreX, CentreY) of the full image. Outside the image the edge is repeated.
/// </summary>
public readonly ref struct FullResolutionPatch(ReadOnlySpan<byte> pixels, int centreX, int centreY, int radius)
{
    public ReadOnlySpan<byte> Pixels { get; } = pixels;

    public int CentreX { get; } = centreX;

    public int CentreY { get; } = centreY;

    public int Radius { get; } = radius;

    public int Side => 2 * Radius + 1;
}

/// <summary>Settings of the full-resolution re-localisation.</summary>
public sealed record RelocalizeOptions
{
    /// <summary>Half side of the correlation template (full-resolution pixels).</summary>
    public int TemplateRadius { get; init; } = 8;

    /// <summary>Largest correction searched, full-resolution pixels.</summary>
    public int MaxShift { get; init; } = 4;

    /// <summary>Smallest normalised cross-correlation accepted at the peak (common practice for template matching: 0.7-0.9).</summary>
    public double MinCorrelation { get; init; } = 0.8;

    /// <summary>Smallest standard deviation of the template, gray levels (a flat template cannot localise).</summary>
    public double MinTemplateDeviation { get; init; } = 3.0;
}

/// <summary>
/// Re-localises a tie point at full resolution: the patch of the image that samples the scene
/// more finely (the anchor) is the template; the other patch is sampled through the current
/// transform (bilinear), shifted over an integer grid of corrections; the normalised
/// cross-correlation peak is refined by a parabola per axis, re-centred on its own result until it
/// settles (so the result does not depend on the transform's prediction). The anchor keeps its integer pixel,
/// so the result does not depend on the corner's working-resolution position.
/// </summary>
public static class TiePointRelocalizer
{
    public static bool TryRelocalize(FullResolutionPatch a, FullResolutionPatch b, in Transform2D aToB, RelocalizeOptions options,
        out Correspondence refined, out double correlation)
    {
        ArgumentNullException.ThrowIfNull(options);
        refined = default;
        correlation = 0;
        double ax = a.CentreX, ay = a.CentreY;
        if (!aToB.TryApply(ax, ay, out double bx, out double by) || aToB.W(ax, ay) <= 0
            || !aToB.TryApply(ax + 1, ay, out double bx1, out double by1) || !aToB.TryApply(ax, ay + 1, out double bx2, out double by2))
        {
            return false;
        }
        double det = (bx1 - bx) * (by2 - by) - (bx2 - bx) * (by1 - by);
        if (Math.Abs(det) <= 1)
        {
            // A samples the scene at least as finely: A's pixel is the anchor.
            if (!Search(a, b, aToB, options, out double qx, out double qy, out correlation))
            {
                return false;
            }
            refined = new Correspondence(ax, ay, qx, qy);
            return true;
        }
        if (!aToB.TryInvert(out var bToA) || !Search(b, a, bToA, options, out double px, out double py, out correlation))
        {
            return false;
        }
        refined = new Correspondence(px, py, b.CentreX, b.CentreY);
        return true;
    }

    /// <summary>Finds where the anchor's centre lies in the other patch (full-image coordinates of the other image).</summary>
    private static bool Search(FullResolutionPatch anchor, FullResolutionPatch other, in Transform2D map, RelocalizeOptions o,
        out double x, out double y, out double best)
    {
        x = y = best = 0;
        int t = o.TemplateRadius, side = 2 * t + 1, n = side * side;
        if (t > anchor.Radius)
        {
            return false;
        }
        Span<float> template = n <= 1024 ? stackalloc float[n] : new float[n];
        Span<float> qx = n <= 1024 ? stackalloc float[n] : new float[n];
        Span<float> qy = n <= 1024 ? stackalloc float[n] : new float[n];
        double mean = 0;
        int k = 0;
        double ox = other.CentreX - other.Radius, oy = other.CentreY - other.Radius;
        float minX = float.MaxValue, minY = float.MaxValue, maxX = float.MinValue, maxY = float.MinValue;
        for (int v = -t; v <= t; v++)
        {
            for (int u = -t; u <= t; u++, k++)
            {
                float val = anchor.Pixels[(anchor.Radius + v) * anchor.Side + anchor.Radius + u];
                template[k] = val;
                mean += val;
                if (!map.TryApply(anchor.CentreX + u, anchor.CentreY + v, out double mx, out double my))
                {
                    return false;
                }
                qx[k] = (float)(mx - ox);
                qy[k] = (float)(my - oy);
                minX = Math.Min(minX, qx[k]);
                maxX = Math.Max(maxX, qx[k]);
                minY = Math.Min(minY, qy[k]);
                maxY = Math.Max(maxY, qy[k]);
            }
        }
        mean /= n;
        double energy = 0;
        for (int i = 0; i < n; i++)
        {
            template[i] -= (float)mean;
            energy += template[i] * template[i];
        }
        if (Math.Sqrt(energy / n) < o.MinTemplateDeviation)
        {
            return false;
        }
        // Integer corrections that keep every sample inside the other patch (bilinear needs one pixel more).
        int last = other.Side - 1;
        int dx0 = Math.Max(-o.MaxShift, (int)Math.Ceiling(-minX)), dx1 = Math.Min(o.MaxShift, (int)Math.Floor(last - 1e-3 - maxX));
        int dy0 = Math.Max(-o.MaxShift, (int)Math.Ceiling(-minY)), dy1 = Math.Min(o.MaxShift, (int)Math.Floor(last - 1e-3 - maxY));
        if (dx1 - dx0 < 2 || dy1 - dy0 < 2)
        {
            return false;
        }
        if (dx0 > 0 || dx1 < 0 || dy0 > 0 || dy1 < 0)
        {
            return false;
        }
        var samples = new CorrelationTemplate(template, energy, qx, qy, minX, maxX, minY, maxY);
        // Hill-climb from the predicted position over the integer grid of corrections: the model is
        // already close, so the peak is a few steps away and most of the grid is never evaluated.
        // The neighbours not yet evaluated are correlated together (each score depends only on its
        // correction, so the order of evaluation does not change any of them).
        int gw = dx1 - dx0 + 1, gh = dy1 - dy0 + 1;
        Span<double> score = gw * gh <= 1024 ? stackalloc double[gw * gh] : new double[gw * gh];
        score.Fill(double.NaN);
        Span<float> cellX = stackalloc float[PatchCorrelation.MaxOffsets];
        Span<float> cellY = stackalloc float[PatchCorrelation.MaxOffsets];
        Span<int> cells = stackalloc int[PatchCorrelation.MaxOffsets];
        Span<double> values = stackalloc double[PatchCorrelation.MaxOffsets];
        int cx = -dx0, cy = -dy0;
        int bestIndex = cy * gw + cx;
        best = score[bestIndex] = PatchCorrelation.Scalar(samples, 0, 0, other);
        while (true)
        {
            int pending = 0;
            for (int ny = Math.Max(0, cy - 1); ny <= Math.Min(gh - 1, cy + 1); ny++)
            {
                for (int nx = Math.Max(0, cx - 1); nx <= Math.Min(gw - 1, cx + 1); nx++)
                {
                    int gi = ny * gw + nx;
                    if (double.IsNaN(score[gi]))
                    {
                        cellX[pending] = nx + dx0;
                        cellY[pending] = ny + dy0;
                        cells[pending++] = gi;
                    }
                }
            }
            if (pending > 0)
            {
                PatchCorrelation.Correlate(samples, cellX[..pending], cellY[..pending], other, values);
                for (int c = 0; c < pending; c++)
                {
                    score[cells[c]] = values[c];
                }
            }
            int next = bestIndex;
            for (int ny = Math.Max(0, cy - 1); ny <= Math.Min(gh - 1, cy + 1); ny++)
            {
                for (int nx = Math.Max(0, cx - 1); nx <= Math.Min(gw - 1, cx + 1); nx++)
                {
                    int gi = ny * gw + nx;
                    if (score[gi] > score[next])
                    {
                        next = gi;
                    }
                }
            }
            if (next == bestIndex)
            {
                break;
            }
            bestIndex = next;
            best = score[next];
            cx = next % gw;
            cy = next / gw;
        }
        int bxi = bestIndex % gw, byi = bestIndex / gw;
        // A peak on the edge of the searched grid may be a slope towards a better place outside it.
        if (best < o.MinCorrelation || bxi == 0 || byi == 0 || bxi == gw - 1 || byi == gh - 1)
        {
            return false;
        }
        // Sub-pixel step: a parabola per axis through the correlation at -1, 0, +1 px, re-centred on its own
        // result until it stops moving. One parabola on the integer grid of corrections is pulled towards
        // the grid, i.e. towards the position the current transform predicts, so the tie points would
        // inherit that transform's error; re-centred, the result is where the correlation one pixel either
        // side is equal, which does not depend on where the search started (TiePointRelocalizerTests).
        double sx = dx0 + bxi + Parabola(score[bestIndex - 1], best, score[bestIndex + 1]);
        double sy = dy0 + byi + Parabola(score[bestIndex - gw], best, score[bestIndex + gw]);
        // A position that does not settle (a ridge rather than a peak, about 2 % of the sweep benchmark's
        // tie points) keeps the first parabola's estimate, as before the re-centring.
        double firstX = sx, firstY = sy;
        if (!Recentre(samples, other, dx0 + 1, dx1 - 1, dy0 + 1, dy1 - 1, ref sx, ref sy))
        {
            (sx, sy) = (firstX, firstY);
        }
        if (!map.TryApply(anchor.CentreX, anchor.CentreY, out double px, out double py))
        {
            return false;
        }
        x = px + sx;
        y = py + sy;
        return true;
    }

    /// <summary>Largest number of re-centred parabola steps, the step (px) below which the position stands, and
    /// the largest last step (px) of a position still moving after all steps that is kept (judgement: a
    /// slowly settling position is a few hundredths off; one still moving by more has no clear peak).</summary>
    private const int RecentreSteps = 8;

    private const double RecentreTolerance = 1e-3;

    private const double RecentreKeep = 0.02;

    /// <summary>
    /// Moves (sx, sy) to where the correlation one pixel either side along each axis is equal (the
    /// parabola through the three values puts its vertex at the centre). False when the position
    /// leaves the searched window or does not settle.
    /// </summary>
    private static bool Recentre(in CorrelationTemplate samples, FullResolutionPatch other, int loX, int hiX, int loY, int hiY,
        ref double sx, ref double sy)
    {
        // The centre and its four neighbours, correlated together.
        Span<float> ox = stackalloc float[5];
        Span<float> oy = stackalloc float[5];
        Span<double> c = stackalloc double[5];
        for (int step = 0; step < RecentreSteps; step++)
        {
            if (sx < loX || sx > hiX || sy < loY || sy > hiY)
            {
                return false;
            }
            float fx = (float)sx, fy = (float)sy;
            ox[0] = fx; oy[0] = fy;
            ox[1] = fx - 1; oy[1] = fy;
            ox[2] = fx + 1; oy[2] = fy;
            ox[3] = fx; oy[3] = fy - 1;
            ox[4] = fx; oy[4] = fy + 1;
            PatchCorrelation.Correlate(samples, ox, oy, other, c);
            double ex = Parabola(c[1], c[0], c[2]);
            double ey = Parabola(c[3], c[0], c[4]);
            sx += ex;
            sy += ey;
            double moved = Math.Max(Math.Abs(ex), Math.Abs(ey));
            if (moved < RecentreTolerance || (step == RecentreSteps - 1 && moved < RecentreKeep))
            {
                return sx >= loX && sx <= hiX && sy >= loY && sy <= hiY;
            }
        }
        return false;
    }

    private static double Parabola(double left, double centre, double right)
    {
        double den = left - 2 * centre + right;
        return den < 0 ? Math.Clamp(0.5 * (left - right) / den, -0.5, 0.5) : 0;
    }
}
