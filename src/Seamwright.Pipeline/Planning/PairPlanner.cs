using System.Globalization;
using System.Text.RegularExpressions;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Planning;

/// <summary>An image as the planner sees it.</summary>
/// <param name="Key">Name in the set.</param>
/// <param name="CaptureTime">From the image metadata, when present.</param>
/// <param name="Coarse">Unit-length coarse signature for the <c>all</c> pre-filter.</param>
public sealed record PlanImage(string Key, DateTimeOffset? CaptureTime, float[] Coarse);

/// <summary>A planned pair: indices into the image list (A before B in the planner's order).</summary>
public readonly record struct PlannedPair(int A, int B);

/// <summary>The plan: the pairs and the images that could not take part, with reasons.</summary>
public sealed record PairPlan(IReadOnlyList<PlannedPair> Pairs, IReadOnlyList<(string Key, string Reason)> Skipped)
{
    /// <summary>
    /// Indices into <see cref="Pairs"/> of the pairs estimated only where the alignment of the other
    /// pairs does not rule out an overlap (sequence pairs two or more steps apart, grid diagonals;
    /// see <see cref="OverlapPlanning"/>). Empty: every pair is estimated.
    /// </summary>
    public IReadOnlySet<int> Conditional { get; init; } = new HashSet<int>();
}

/// <summary>Chooses which image pairs of a set are estimated.</summary>
public static class PairPlanner
{
    public static PairPlan Plan(PairingSettings settings, IReadOnlyList<PlanImage> images)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(images);
        var mode = settings.Mode;
        if (mode == PairingMode.Auto)
        {
            var grid = new Regex(settings.GridPattern, RegexOptions.CultureInvariant | RegexOptions.IgnoreCase, TimeSpan.FromSeconds(1));
            mode = images.Count > 1 && images.All(i => grid.IsMatch(Path.GetFileNameWithoutExtension(i.Key))) ? PairingMode.Grid : PairingMode.Sequence;
        }
        return mode switch
        {
            PairingMode.Sequence => Sequence(settings, images),
            PairingMode.Grid => Grid(settings, images),
            PairingMode.All => All(settings, images),
            PairingMode.Frames => Frames(images),
            _ => throw new ArgumentOutOfRangeException(nameof(settings), settings.Mode, "unknown pairing mode"),
        };
    }

    /// <summary>Each image with the next <c>span</c> images in order; with wrap-around the last ones also pair with the first.</summary>
    private static PairPlan Sequence(PairingSettings s, IReadOnlyList<PlanImage> images)
    {
        int[] order = Enumerable.Range(0, images.Count).ToArray();
        if (s.Order == SequenceOrder.CaptureTime)
        {
            // Images with a capture time first in time order; the rest after them in name order.
            Array.Sort(order, (x, y) =>
            {
                var tx = images[x].CaptureTime;
                var ty = images[y].CaptureTime;
                if (tx.HasValue != ty.HasValue)
                {
                    return tx.HasValue ? -1 : 1;
                }
                int c = tx.HasValue ? tx.Value.CompareTo(ty!.Value) : 0;
                return c != 0 ? c : NaturalComparer.Instance.Compare(images[x].Key, images[y].Key);
            });
        }
        else
        {
            Array.Sort(order, (x, y) => NaturalComparer.Instance.Compare(images[x].Key, images[y].Key));
        }
        int n = order.Length;
        var pairs = new List<PlannedPair>();
        var conditional = new HashSet<int>();
        var seen = new HashSet<(int, int)>();
        for (int i = 0; i < n; i++)
        {
            for (int k = 1; k <= s.NeighbourSpan; k++)
            {
                int j = i + k;
                if (j >= n)
                {
                    if (!s.Wrap || n < 3)
                    {
                        break;
                    }
                    j -= n;
                }
                if (j == i)
                {
                    continue;
                }
                var key = (Math.Min(order[i], order[j]), Math.Max(order[i], order[j]));
                if (seen.Add(key))
                {
                    if (k >= 2)
                    {
                        conditional.Add(pairs.Count);
                    }
                    pairs.Add(new PlannedPair(order[i], order[j]));
                }
            }
        }
        return new PairPlan(pairs, []) { Conditional = conditional };
    }

    /// <summary>4-neighbours (and diagonals by setting) of a row/column grid read from the file names.</summary>
    private static PairPlan Grid(PairingSettings s, IReadOnlyList<PlanImage> images)
    {
        var regex = new Regex(s.GridPattern, RegexOptions.CultureInvariant | RegexOptions.IgnoreCase, TimeSpan.FromSeconds(1));
        var at = new Dictionary<(long Row, long Col), int>();
        var skipped = new List<(string, string)>();
        for (int i = 0; i < images.Count; i++)
        {
            string name = Path.GetFileNameWithoutExtension(images[i].Key);
            var m = regex.Match(name);
            if (!m.Success || !long.TryParse(m.Groups["row"].Value, NumberStyles.None, CultureInfo.InvariantCulture, out long row)
                || !long.TryParse(m.Groups["col"].Value, NumberStyles.None, CultureInfo.InvariantCulture, out long col))
            {
                skipped.Add((images[i].Key, $"the file name does not match the grid pattern '{s.GridPattern}' (groups 'row' and 'col')"));
                continue;
            }
            if (!at.TryAdd((row, col), i))
            {
                skipped.Add((images[i].Key, $"grid cell row {row}, column {col} is already taken by {images[at[(row, col)]].Key}"));
            }
        }
        var steps = s.GridDiagonals ? new (long, long)[] { (0, 1), (1, 0), (1, 1), (1, -1) } : [(0, 1), (1, 0)];
        var pairs = new List<PlannedPair>();
        var conditional = new HashSet<int>();
        foreach (var ((row, col), i) in at.OrderBy(kv => kv.Key.Row).ThenBy(kv => kv.Key.Col))
        {
            foreach (var (dr, dc) in steps)
            {
                if (at.TryGetValue((row + dr, col + dc), out int j))
                {
                    if (dr != 0 && dc != 0)
                    {
                        conditional.Add(pairs.Count);
                    }
                    pairs.Add(new PlannedPair(i, j));
                }
            }
        }
        return new PairPlan(pairs, skipped) { Conditional = conditional };
    }

    /// <summary>
    /// Every pair would be n(n-1)/2 estimates; a cheap pre-filter ranks partners by the cosine of the
    /// coarse signatures and keeps, for each image, its best <c>AllMaxPartners</c> above
    /// <c>AllMinSimilarity</c> (a pair kept by either image is estimated). Above 64 images the
    /// partners come from a <see cref="CoarseIndex"/> (same partners, far fewer comparisons).
    /// </summary>
    private static PairPlan All(PairingSettings s, IReadOnlyList<PlanImage> images)
    {
        // The index gives the same partners; it needs a positive floor and no empty signature (judgement: below 64 images the scan is cheaper).
        if (images.Count <= 64 || s.AllMinSimilarity <= 0 || images.Any(i => !i.Coarse.Any(v => v != 0)))
        {
            return AllByFullScan(s, images);
        }
        var signatures = images.Select(i => i.Coarse).ToList();
        var index = new CoarseIndex(signatures);
        var keep = new HashSet<(int, int)>();
        for (int i = 0; i < images.Count; i++)
        {
            foreach (int j in index.Best(i, s.AllMaxPartners, s.AllMinSimilarity, signatures))
            {
                keep.Add((Math.Min(i, j), Math.Max(i, j)));
            }
        }
        var pairs = keep.OrderBy(p => p.Item1).ThenBy(p => p.Item2).Select(p => new PlannedPair(p.Item1, p.Item2)).ToList();
        return new PairPlan(pairs, []);
    }

    /// <summary>The same rule by comparing every image with every other (n (n - 1) comparisons).</summary>
    internal static PairPlan AllByFullScan(PairingSettings s, IReadOnlyList<PlanImage> images)
    {
        int n = images.Count;
        var keep = new HashSet<(int, int)>();
        for (int i = 0; i < n; i++)
        {
            var ranked = new List<(double Sim, int J)>();
            for (int j = 0; j < n; j++)
            {
                if (j != i)
                {
                    double sim = Cosine(images[i].Coarse, images[j].Coarse);
                    if (sim >= s.AllMinSimilarity)
                    {
                        ranked.Add((sim, j));
                    }
                }
            }
            foreach (var (_, j) in ranked.OrderByDescending(r => r.Sim).ThenBy(r => r.J).Take(s.AllMaxPartners))
            {
                keep.Add((Math.Min(i, j), Math.Max(i, j)));
            }
        }
        var pairs = keep.OrderBy(p => p.Item1).ThenBy(p => p.Item2).Select(p => new PlannedPair(p.Item1, p.Item2)).ToList();
        return new PairPlan(pairs, []);
    }

    /// <summary>One frame seen by several cameras: every camera pair (camera rigs are small).</summary>
    private static PairPlan Frames(IReadOnlyList<PlanImage> images)
    {
        var pairs = new List<PlannedPair>();
        for (int i = 0; i < images.Count; i++)
        {
            for (int j = i + 1; j < images.Count; j++)
            {
                pairs.Add(new PlannedPair(i, j));
            }
        }
        return new PairPlan(pairs, []);
    }

    public static double Cosine(float[] a, float[] b)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        int n = Math.Min(a.Length, b.Length);
        double dot = 0, na = 0, nb = 0;
        for (int i = 0; i < n; i++)
        {
            dot += a[i] * (double)b[i];
            na += a[i] * (double)a[i];
            nb += b[i] * (double)b[i];
        }
        return na > 0 && nb > 0 ? dot / Math.Sqrt(na * nb) : 0;
    }
}
