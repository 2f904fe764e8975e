using System.Globalization;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>
/// Consistency of the links around cycles: chaining the transforms around a closed loop must
/// return every point to itself. Cycles up to a set length are enumerated (each once, from its
/// lowest-index link). A link found in a consistent cycle is trusted; among links in inconsistent
/// cycles that are not trusted, the one in most of them is demoted, and so on until every
/// inconsistent cycle holds a demoted link or only trusted ones.
/// </summary>
internal static class CycleCheck
{
    private const int PointsPerSide = 16;

    private sealed record Cycle(int[] Links, bool Consistent, double ClosurePx, double TolerancePx);

    /// <summary>Demotes inconsistent links in the graph; returns the demotions.</summary>
    public static List<DemotedLink> Run(LinkGraph graph, AlignmentOptions options)
    {
        var cycles = Enumerate(graph, options);
        var trusted = new bool[graph.Links.Count];
        foreach (var c in cycles.Where(c => c.Consistent))
        {
            foreach (int l in c.Links)
            {
                trusted[l] = true;
            }
        }
        var demoted = new List<DemotedLink>();
        var isDemoted = new bool[graph.Links.Count];
        while (true)
        {
            var open = cycles.Where(c => !c.Consistent && !c.Links.Any(l => isDemoted[l])).ToList();
            var counts = new Dictionary<int, int>();
            foreach (var c in open)
            {
                foreach (int l in c.Links.Where(l => !trusted[l]))
                {
                    counts[l] = counts.GetValueOrDefault(l) + 1;
                }
            }
            if (counts.Count == 0)
            {
                break;
            }
            // Most inconsistent cycles first; then the weaker link; then the higher index (later input).
            int worst = counts.OrderByDescending(kv => kv.Value)
                .ThenBy(kv => graph.Links[kv.Key].Weight)
                .ThenByDescending(kv => kv.Key)
                .First().Key;
            var mine = open.Where(c => c.Links.Contains(worst)).ToList();
            var worstCycle = mine.MaxBy(c => c.ClosurePx / c.TolerancePx)!;
            int total = cycles.Count(c => c.Links.Contains(worst));
            isDemoted[worst] = true;
            graph.Active[worst] = false;
            var link = graph.Links[worst];
            demoted.Add(new DemotedLink(link.ImageA, link.ImageB, "cycle check", string.Create(CultureInfo.InvariantCulture,
                $"inconsistent in {mine.Count} of {total} cycles through it and consistent in none; worst closure error {worstCycle.ClosurePx:0.#} px over {worstCycle.Links.Length} links (tolerance {worstCycle.TolerancePx:0.#} px)")));
        }
        return demoted;
    }

    private static List<Cycle> Enumerate(LinkGraph graph, AlignmentOptions options)
    {
        var cycles = new List<Cycle>();
        long budget = 64L * Math.Max(1, options.MaxCycles);
        var path = new List<int>();
        var onPath = new bool[graph.ImageCount];
        for (int e = 0; e < graph.Links.Count && cycles.Count < options.MaxCycles; e++)
        {
            if (!graph.Active[e])
            {
                continue;
            }
            int a = graph.Links[e].ImageA, b = graph.Links[e].ImageB;
            if (a == b)
            {
                continue;
            }
            path.Clear();
            path.Add(e);
            onPath[a] = true;
            onPath[b] = true;
            Search(graph, options, e, a, b, path, onPath, cycles, ref budget);
            onPath[a] = false;
            onPath[b] = false;
        }
        return cycles;
    }

    private static void Search(LinkGraph graph, AlignmentOptions options, int first, int start, int at,
        List<int> path, bool[] onPath, List<Cycle> cycles, ref long budget)
    {
        foreach (int l in graph.LinksAt(at))
        {
            if (l <= first || path.Contains(l) || cycles.Count >= options.MaxCycles || --budget < 0)
            {
                continue;
            }
            int next = graph.Other(l, at);
            if (next == start)
            {
                path.Add(l);
                cycles.Add(Measure(graph, options, start, path));
                path.RemoveAt(path.Count - 1);
                continue;
            }
            if (onPath[next] || path.Count + 1 >= options.MaxCycleLength)
            {
                continue;
            }
            onPath[next] = true;
            path.Add(l);
            Search(graph, options, first, start, next, path, onPath, cycles, ref budget);
            path.RemoveAt(path.Count - 1);
            onPath[next] = false;
        }
    }

    private static Cycle Measure(LinkGraph graph, AlignmentOptions options, int start, List<int> path)
    {
        var loop = Transform2D.Identity;
        int at = start;
        foreach (int l in path)
        {
            loop = graph.FittedStep(l, at) * loop;
            at = graph.Other(l, at);
        }
        double sum = 0;
        int n = 0;
        foreach (int l in new[] { path[0], path[^1] })
        {
            var link = graph.Links[l];
            bool first = link.ImageA == start;
            var ties = link.TiePoints;
            int step = Math.Max(1, ties.Length / PointsPerSide);
            for (int i = 0; i < ties.Length; i += step)
            {
                double x = first ? ties[i].X1 : ties[i].X2, y = first ? ties[i].Y1 : ties[i].Y2;
                var (u, v) = loop.Apply(x, y);
                sum += TransformOps.Distance(x, y, u, v);
                n++;
            }
        }
        if (n == 0)
        {
            var size = graph.Sizes[start];
            foreach (var (x, y) in Transform2D.Corners(size.Width, size.Height))
            {
                var (u, v) = loop.Apply(x, y);
                sum += TransformOps.Distance(x, y, u, v);
                n++;
            }
        }
        double closure = sum / n;
        var s = graph.Sizes[start];
        double diagonal = Math.Sqrt((double)s.Width * s.Width + (double)s.Height * s.Height);
        double tolerance = Math.Max(options.CycleTolerancePx, options.CycleToleranceFraction * diagonal) * Math.Sqrt(path.Count / 3.0);
        return new Cycle([.. path], closure <= tolerance, closure, tolerance);
    }
}
