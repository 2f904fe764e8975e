using System.Buffers;

namespace Seamwright.Core.Features;

/// <summary>A corner found on one pyramid level, in that level's pixel coordinates.</summary>
internal readonly record struct LevelCorner(float X, float Y, float Response);

/// <summary>
/// Corners on one image: smaller eigenvalue of the structure tensor (Shi, Tomasi, CVPR 1994),
/// a floor relative to the estimated noise, 3x3 non-maximum suppression, a quadratic sub-pixel
/// fit of the response, and a spatially even pick by grid buckets (round-robin over cells in
/// order of response).
/// </summary>
internal static class CornerDetector
{
    /// <param name="floor">Smallest response kept (the noise floor of this level).</param>
    public static List<LevelCorner> Detect(ReadOnlySpan<byte> pixels, int w, int h, ReadOnlySpan<byte> mask,
        int border, int budget, float floor, CornerDetectorOptions options)
    {
        var found = new List<LevelCorner>();
        if (w <= 2 * border + 2 || h <= 2 * border + 2 || budget <= 0)
        {
            return found;
        }
        int n = w * h;
        float[] response = ArrayPool<float>.Shared.Rent(n);
        try
        {
            CornerResponse.Compute(pixels, w, h, options.BlockSize, 0, Span<float>.Empty, response.AsSpan(0, n));
            Collect(response, w, h, mask, border, floor, found);
        }
        finally
        {
            ArrayPool<float>.Shared.Return(response);
        }
        return SpreadPick(found, w, h, budget, options.CellSize);
    }

    private static void Collect(float[] r, int w, int h, ReadOnlySpan<byte> mask, int border, float floor, List<LevelCorner> found)
    {
        for (int y = border; y < h - border; y++)
        {
            int o = y * w;
            for (int x = border; x < w - border; x++)
            {
                int i = o + x;
                float v = r[i];
                if (v <= floor)
                {
                    continue;
                }
                // Strictly above the neighbours before, at least the ones after: one winner per plateau.
                if (v <= r[i - w - 1] || v <= r[i - w] || v <= r[i - w + 1] || v <= r[i - 1]
                    || v < r[i + 1] || v < r[i + w - 1] || v < r[i + w] || v < r[i + w + 1])
                {
                    continue;
                }
                if (!mask.IsEmpty && mask[i] < 128)
                {
                    continue;
                }
                var (dx, dy) = SubPixel(r, i, w);
                found.Add(new LevelCorner(x + dx, y + dy, v));
            }
        }
    }

    /// <summary>Offset of the peak of the quadratic through the 3x3 neighbourhood (zero when it is not a clean peak).</summary>
    private static (float Dx, float Dy) SubPixel(float[] r, int i, int w)
    {
        double gx = (r[i + 1] - r[i - 1]) * 0.5, gy = (r[i + w] - r[i - w]) * 0.5;
        double xx = r[i + 1] - 2.0 * r[i] + r[i - 1], yy = r[i + w] - 2.0 * r[i] + r[i - w];
        double xy = (r[i + w + 1] - r[i + w - 1] - r[i - w + 1] + r[i - w - 1]) * 0.25;
        double det = xx * yy - xy * xy;
        if (xx >= 0 || det <= 0)
        {
            return (0, 0);
        }
        double dx = -(yy * gx - xy * gy) / det, dy = -(xx * gy - xy * gx) / det;
        if (Math.Abs(dx) > 1 || Math.Abs(dy) > 1)
        {
            return (0, 0);
        }
        return ((float)Math.Clamp(dx, -0.5, 0.5), (float)Math.Clamp(dy, -0.5, 0.5));
    }

    /// <summary>Keeps at most budget corners: the best of every cell first, then the second best, and so on.</summary>
    private static List<LevelCorner> SpreadPick(List<LevelCorner> corners, int w, int h, int budget, int cell)
    {
        if (corners.Count <= budget)
        {
            return corners;
        }
        int n = corners.Count;
        var order = new int[n];
        var strength = new float[n];
        for (int i = 0; i < n; i++)
        {
            order[i] = i;
            strength[i] = -corners[i].Response;
        }
        // Collect emits in raster order, so the index breaks ties deterministically.
        Array.Sort(order, (a, b) => strength[a] != strength[b] ? strength[a].CompareTo(strength[b]) : a.CompareTo(b));
        int cols = (w + cell - 1) / cell, rows = (h + cell - 1) / cell;
        var counts = new int[cols * rows];
        var rank = new long[n];
        for (int k = 0; k < n; k++)
        {
            var c = corners[order[k]];
            int cx = Math.Min((int)c.X / cell, cols - 1), cy = Math.Min((int)c.Y / cell, rows - 1);
            int r = counts[cy * cols + cx]++;
            rank[k] = ((long)r << 32) | (uint)k;
        }
        Array.Sort(rank);
        var picked = new List<LevelCorner>(budget);
        for (int k = 0; k < budget; k++)
        {
            picked.Add(corners[order[(int)(rank[k] & 0xFFFFFFFF)]]);
        }
        return picked;
    }
}
