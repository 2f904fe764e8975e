using System.Buffers;
using System.Numerics;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;

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

    internal static void Collect(float[] r, int w, int h, ReadOnlySpan<byte> mask, int border, float floor, List<LevelCorner> found)
    {
        int x1 = w - border;
        for (int y = border; y < h - border; y++)
        {
            int o = y * w;
            int x = border;
            if (Vector256.IsHardwareAccelerated)
            {
                // Eight pixels at a time: the same tests as below, as one bit mask; the few survivors are visited in order.
                var vfloor = Vector256.Create(floor);
                ref float r0 = ref MemoryMarshal.GetArrayDataReference(r);
                for (; x + Vector256<float>.Count <= x1; x += Vector256<float>.Count)
                {
                    int i = o + x;
                    var v = Vector256.LoadUnsafe(ref r0, (nuint)i);
                    var keep = Vector256.GreaterThan(v, vfloor);
                    if (keep == Vector256<float>.Zero)
                    {
                        continue;
                    }
                    keep &= Vector256.GreaterThan(v, Vector256.LoadUnsafe(ref r0, (nuint)(i - w - 1)))
                        & Vector256.GreaterThan(v, Vector256.LoadUnsafe(ref r0, (nuint)(i - w)))
                        & Vector256.GreaterThan(v, Vector256.LoadUnsafe(ref r0, (nuint)(i - w + 1)))
                        & Vector256.GreaterThan(v, Vector256.LoadUnsafe(ref r0, (nuint)(i - 1)))
                        & Vector256.GreaterThanOrEqual(v, Vector256.LoadUnsafe(ref r0, (nuint)(i + 1)))
                        & Vector256.GreaterThanOrEqual(v, Vector256.LoadUnsafe(ref r0, (nuint)(i + w - 1)))
                        & Vector256.GreaterThanOrEqual(v, Vector256.LoadUnsafe(ref r0, (nuint)(i + w)))
                        & Vector256.GreaterThanOrEqual(v, Vector256.LoadUnsafe(ref r0, (nuint)(i + w + 1)));
                    for (uint bits = keep.ExtractMostSignificantBits(); bits != 0; bits &= bits - 1)
                    {
                        int xi = x + BitOperations.TrailingZeroCount(bits);
                        Accept(r, w, mask, o + xi, xi, y, found);
                    }
                }
            }
            for (; x < x1; x++)
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
                Accept(r, w, mask, i, x, y, found);
            }
        }
    }

    private static void Accept(float[] r, int w, ReadOnlySpan<byte> mask, int i, int x, int y, List<LevelCorner> found)
    {
        // Only pixels wholly outside excluded regions (area averaging leaves partly covered ones below 255).
        if (!mask.IsEmpty && mask[i] < 255)
        {
            return;
        }
        var (dx, dy) = SubPixel(r, i, w);
        found.Add(new LevelCorner(x + dx, y + dy, r[i]));
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

    /// <summary>
    /// Keeps at most budget corners: the best of every cell first (in order of response), then the
    /// second best of every cell, and so on. Candidates are bucketed by cell and only the cells are
    /// sorted, so the cost stays near linear in the number of candidates.
    /// </summary>
    internal static List<LevelCorner> SpreadPick(List<LevelCorner> corners, int w, int h, int budget, int cell)
    {
        if (corners.Count <= budget)
        {
            return corners;
        }
        int n = corners.Count;
        int cols = (w + cell - 1) / cell, rows = (h + cell - 1) / cell, cells = cols * rows;
        var start = new int[cells + 1];
        var cellOf = new int[n];
        for (int i = 0; i < n; i++)
        {
            var c = corners[i];
            int cx = Math.Min((int)c.X / cell, cols - 1), cy = Math.Min((int)c.Y / cell, rows - 1);
            cellOf[i] = cy * cols + cx;
            start[cellOf[i] + 1]++;
        }
        for (int k = 0; k < cells; k++)
        {
            start[k + 1] += start[k];
        }
        var fill = (int[])start.Clone();
        var members = new int[n];
        var keys = new float[n];
        for (int i = 0; i < n; i++)
        {
            int slot = fill[cellOf[i]]++;
            members[slot] = i;
            keys[slot] = -corners[i].Response;
        }
        for (int k = 0; k < cells; k++)
        {
            int len = start[k + 1] - start[k];
            if (len > 1)
            {
                Array.Sort(keys, members, start[k], len);
            }
        }
        var picked = new List<LevelCorner>(budget);
        var round = new List<int>();
        for (int rank = 0; picked.Count < budget; rank++)
        {
            round.Clear();
            for (int k = 0; k < cells; k++)
            {
                if (start[k] + rank < start[k + 1])
                {
                    round.Add(members[start[k] + rank]);
                }
            }
            // Within a round: strongest first, ties by raster order.
            round.Sort((a, b) => corners[a].Response != corners[b].Response ? corners[b].Response.CompareTo(corners[a].Response) : a.CompareTo(b));
            foreach (int i in round)
            {
                if (picked.Count == budget)
                {
                    break;
                }
                picked.Add(corners[i]);
            }
        }
        return picked;
    }
}
