using Seamwright.Core.Geometry;

namespace Seamwright.Core.Matching;

/// <summary>
/// Removes repeated correspondences. The same corner found on two neighbouring pyramid levels of
/// both images gives two matches of one scene point; re-localisation then moves both onto the
/// same anchor pixel, so they become the same tie point twice and inflate the consensus count
/// while shrinking its spread. A correspondence is a repeat of an earlier one when both of its
/// points lie within the tolerance (Chebyshev distance) of that one's points; the earlier one
/// (best ranked, since matches come best first) is kept. Deterministic: depends only on order and values.
/// </summary>
public static class DistinctTies
{
    /// <summary>Indices of the correspondences kept, in their original order.</summary>
    public static int[] Select(ReadOnlySpan<Correspondence> ties, double tolerance)
    {
        if (!(tolerance > 0) || double.IsInfinity(tolerance))
        {
            throw new ArgumentOutOfRangeException(nameof(tolerance), tolerance, "The tolerance must be a positive finite number of pixels.");
        }
        var cells = new Dictionary<(long, long), List<int>>(ties.Length);
        var kept = new List<int>(ties.Length);
        for (int i = 0; i < ties.Length; i++)
        {
            var t = ties[i];
            long cx = (long)Math.Floor(t.X1 / tolerance), cy = (long)Math.Floor(t.Y1 / tolerance);
            if (IsRepeat(ties, t, cells, cx, cy, tolerance))
            {
                continue;
            }
            if (!cells.TryGetValue((cx, cy), out var list))
            {
                cells[(cx, cy)] = list = new List<int>(1);
            }
            list.Add(i);
            kept.Add(i);
        }
        return [.. kept];
    }

    /// <summary>The correspondences kept, in their original order.</summary>
    public static Correspondence[] Distinct(ReadOnlySpan<Correspondence> ties, double tolerance)
    {
        var keep = Select(ties, tolerance);
        var result = new Correspondence[keep.Length];
        for (int i = 0; i < keep.Length; i++)
        {
            result[i] = ties[keep[i]];
        }
        return result;
    }

    private static bool IsRepeat(ReadOnlySpan<Correspondence> ties, Correspondence t, Dictionary<(long, long), List<int>> cells,
        long cx, long cy, double tolerance)
    {
        for (long y = cy - 1; y <= cy + 1; y++)
        {
            for (long x = cx - 1; x <= cx + 1; x++)
            {
                if (!cells.TryGetValue((x, y), out var list))
                {
                    continue;
                }
                foreach (int j in list)
                {
                    var k = ties[j];
                    if (Math.Abs(k.X1 - t.X1) <= tolerance && Math.Abs(k.Y1 - t.Y1) <= tolerance
                        && Math.Abs(k.X2 - t.X2) <= tolerance && Math.Abs(k.Y2 - t.Y2) <= tolerance)
                    {
                        return true;
                    }
                }
            }
        }
        return false;
    }
}
