using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>
/// Places every image of a set in one reference frame: usable links, cycle consistency, connected
/// components, reference choice, a maximum-confidence spanning tree to start, a plane-fit check,
/// joint refinement over all tie points, a re-check of every link against the joint solution, and
/// the reasons for every image left unplaced. Deterministic: no randomness, no parallelism.
/// </summary>
public static class SetAligner
{
    public static SetAlignment Align(IReadOnlyList<ImageSize> sizes, IReadOnlyList<AlignmentLink> links, MotionModel model, AlignmentOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(sizes);
        ArgumentNullException.ThrowIfNull(links);
        options ??= new AlignmentOptions();
        options.Validate();
        if (options.ReferenceImage is int r && (r < 0 || r >= sizes.Count))
        {
            throw new ArgumentOutOfRangeException(nameof(options), $"Alignment setting ReferenceImage must be in 0..{sizes.Count - 1}.");
        }
        var state = new AlignState(sizes, links, model, options);
        return state.Run();
    }

    private sealed class AlignState(IReadOnlyList<ImageSize> sizes, IReadOnlyList<AlignmentLink> inputLinks, MotionModel model, AlignmentOptions options)
    {
        private readonly List<DemotedLink> _demoted = [];
        private readonly bool[] _excluded = new bool[sizes.Count];
        private readonly string?[] _exclusionReason = new string?[sizes.Count];
        private readonly List<string> _nonPlanar = [];
        private AlignmentLink[] _links = [];
        private LinkGraph? _graph;

        public SetAlignment Run()
        {
            var usable = Prepare();
            _graph = new LinkGraph(sizes, _links, usable, model, options.RobustScalePx);
            _demoted.AddRange(CycleCheck.Run(_graph, options));
            List<ComponentResult> results;
            int round = 0;
            while (true)
            {
                bool allowRecheck = round < options.MaxRounds - 1;
                (results, bool changed) = AlignAll(allowRecheck);
                round++;
                if (!changed)
                {
                    break;
                }
            }
            return Finish(results, usable);
        }

        /// <summary>Keeps links of a usable status with valid ends and an invertible transform; fills in tie points when none are given.</summary>
        private List<int> Prepare()
        {
            _links = new AlignmentLink[inputLinks.Count];
            var usable = new List<int>();
            for (int l = 0; l < inputLinks.Count; l++)
            {
                var link = inputLinks[l];
                _links[l] = link;
                bool statusOk = link.Status == PairStatus.Accepted || (options.IncludeWeakLinks && link.Status == PairStatus.Weak);
                if (!statusOk)
                {
                    continue;
                }
                string? problem = null;
                if (link.ImageA < 0 || link.ImageA >= sizes.Count || link.ImageB < 0 || link.ImageB >= sizes.Count)
                {
                    problem = "an image index is out of range";
                }
                else if (link.ImageA == link.ImageB)
                {
                    problem = "it links an image to itself";
                }
                else if (!link.AToB.IsFinite || !link.AToB.TryInvert(out _))
                {
                    problem = "its transform is not finite or not invertible";
                }
                if (problem is not null)
                {
                    _demoted.Add(new DemotedLink(link.ImageA, link.ImageB, "input", problem));
                    _links[l] = link with { Status = PairStatus.Rejected };
                    continue;
                }
                var ties = link.TiePoints ?? [];
                if (ties.Length == 0)
                {
                    ties = SyntheticTies(link.AToB, sizes[link.ImageA]);
                }
                _links[l] = link with { TiePoints = Subsample(ties, options.MaxTiePointsPerLink) };
                usable.Add(l);
            }
            return usable;
        }

        private static Correspondence[] SyntheticTies(Transform2D aToB, ImageSize a)
        {
            var ties = new List<Correspondence>();
            for (int i = 1; i <= 3; i++)
            {
                for (int j = 1; j <= 3; j++)
                {
                    double x = (a.Width - 1) * i / 4.0, y = (a.Height - 1) * j / 4.0;
                    if (aToB.W(x, y) > 0 && aToB.TryApply(x, y, out double u, out double v))
                    {
                        ties.Add(new Correspondence(x, y, u, v));
                    }
                }
            }
            return [.. ties];
        }

        private static Correspondence[] Subsample(Correspondence[] ties, int max)
        {
            if (ties.Length <= max)
            {
                return ties;
            }
            var result = new Correspondence[max];
            for (int i = 0; i < max; i++)
            {
                result[i] = ties[(int)((long)i * ties.Length / max)];
            }
            return result;
        }

        private sealed record ComponentResult(int Reference, int[] Images, Dictionary<int, Transform2D> ToReference, ResidualFigures Residuals, int Links);

        private (List<ComponentResult> Results, bool Changed) AlignAll(bool allowRecheck)
        {
            var graph = _graph!;
            var results = new List<ComponentResult>();
            bool changed = false;
            foreach (var members in graph.Components(i => !_excluded[i]))
            {
                if (members.Length < 2 && sizes.Count > 1)
                {
                    continue;
                }
                var inComponent = new HashSet<int>(members);
                bool Allowed(int i) => inComponent.Contains(i);
                int reference = ChooseReference(members, Allowed);
                var initial = SpanningTreeChain(members, reference, Allowed);
                if (ExcludeOffPlane(initial, reference, Allowed, "spanning tree"))
                {
                    changed = true;
                    continue;
                }
                var componentLinks = Enumerable.Range(0, _links.Length)
                    .Where(l => graph.Active[l] && inComponent.Contains(_links[l].ImageA) && inComponent.Contains(_links[l].ImageB))
                    .ToArray();
                var refiner = new JointRefiner(model, sizes, reference, members,
                    [.. componentLinks.Select(l => (_links[l].ImageA, _links[l].ImageB, _links[l].TiePoints))], options.RobustScalePx, options.MinRobustScalePx);
                var joint = options.JointRefinement ? refiner.Solve(initial, options.MaxIterations, options.AdaptRobustScale)
                    : new JointSolution(initial, 0, 0, 0, options.RobustScalePx);
                var solved = joint.ToReference.ToDictionary(kv => kv.Key, kv => TransformOps.Orient(kv.Value, 0, 0).Normalized());
                if (ExcludeOffPlane(solved, reference, Allowed, "joint solution"))
                {
                    changed = true;
                    continue;
                }
                var treeResiduals = new List<double>();
                var jointResiduals = new List<double>();
                foreach (int l in componentLinks)
                {
                    var link = _links[l];
                    Residuals(initial[link.ImageA], initial[link.ImageB], link.TiePoints, treeResiduals);
                    int before = jointResiduals.Count;
                    Residuals(solved[link.ImageA], solved[link.ImageB], link.TiePoints, jointResiduals);
                    if (allowRecheck && options.JointRefinement)
                    {
                        double median = Median(jointResiduals.Skip(before).ToList());
                        if (median > options.LinkResidualLimitPx)
                        {
                            graph.Active[l] = false;
                            changed = true;
                            _demoted.Add(new DemotedLink(link.ImageA, link.ImageB, "joint re-check", string.Create(CultureInfo.InvariantCulture,
                                $"disagrees with the joint solution: median tie-point residual {median:0.##} px over {link.TiePoints.Length} tie points (limit {options.LinkResidualLimitPx} px)")));
                        }
                    }
                }
                var figures = new ResidualFigures(
                    treeResiduals.Count / 2,
                    Rms(treeResiduals),
                    Rms(jointResiduals),
                    Median(jointResiduals),
                    jointResiduals.Count > 0 ? jointResiduals.Max() : 0,
                    joint.Iterations);
                results.Add(new ComponentResult(reference, members, solved, figures, componentLinks.Length));
            }
            return (results, changed);
        }

        private int ChooseReference(int[] members, Func<int, bool> allowed)
        {
            if (options.ReferenceImage is int named && members.Contains(named))
            {
                return named;
            }
            // Most links first; among equals the most central (smallest sum of link hops to the
            // others, so chains from the reference stay short), then the larger total weight.
            var connectivity = members.Select(i => _graph!.Connectivity(i, allowed)).ToArray();
            int maxDegree = connectivity.Max(c => c.Degree);
            // Only the images of the highest degree can win, so only they need their hop sums.
            var hops = new int[_graph!.ImageCount];
            Array.Fill(hops, -1);
            var queue = new int[_graph.ImageCount];
            int best = -1;
            long bestHops = 0;
            double bestWeight = 0;
            for (int k = 0; k < members.Length; k++)
            {
                if (connectivity[k].Degree < maxDegree)
                {
                    continue;
                }
                long hopSum = HopSum(members[k], allowed, hops, queue);
                double weight = connectivity[k].Weight;
                if (best < 0 || hopSum < bestHops || (hopSum == bestHops && weight > bestWeight))
                {
                    (best, bestHops, bestWeight) = (members[k], hopSum, weight);
                }
            }
            return best;
        }

        /// <summary>Sum of link hops from <paramref name="start"/> to every image it reaches (breadth first; the arrays are scratch, hops reset to -1 on return).</summary>
        private long HopSum(int start, Func<int, bool> allowed, int[] hops, int[] queue)
        {
            hops[start] = 0;
            queue[0] = start;
            int head = 0, tail = 1;
            long sum = 0;
            while (head < tail)
            {
                int u = queue[head++];
                sum += hops[u];
                foreach (int l in _graph!.LinksAt(u, allowed))
                {
                    int v = _graph.Other(l, u);
                    if (hops[v] < 0)
                    {
                        hops[v] = hops[u] + 1;
                        queue[tail++] = v;
                    }
                }
            }
            for (int k = 0; k < tail; k++)
            {
                hops[queue[k]] = -1;
            }
            return sum;
        }

        /// <summary>Maximum-confidence spanning tree (Kruskal), chained outwards from the reference.</summary>
        private Dictionary<int, Transform2D> SpanningTreeChain(int[] members, int reference, Func<int, bool> allowed)
        {
            var graph = _graph!;
            var candidates = members.SelectMany(i => graph.LinksAt(i, allowed)).Distinct()
                .OrderByDescending(l => _links[l].Weight).ThenBy(l => l).ToList();
            var parent = members.ToDictionary(i => i, i => i);
            int Find(int i)
            {
                while (parent[i] != i)
                {
                    parent[i] = parent[parent[i]];
                    i = parent[i];
                }
                return i;
            }
            var treeLinks = new Dictionary<int, List<int>>();
            foreach (int l in candidates)
            {
                int ra = Find(_links[l].ImageA), rb = Find(_links[l].ImageB);
                if (ra == rb)
                {
                    continue;
                }
                parent[ra] = rb;
                foreach (int end in new[] { _links[l].ImageA, _links[l].ImageB })
                {
                    if (!treeLinks.TryGetValue(end, out var list))
                    {
                        treeLinks[end] = list = [];
                    }
                    list.Add(l);
                }
            }
            var toReference = new Dictionary<int, Transform2D> { [reference] = Transform2D.Identity };
            var queue = new Queue<int>();
            queue.Enqueue(reference);
            while (queue.Count > 0)
            {
                int u = queue.Dequeue();
                foreach (int l in treeLinks.GetValueOrDefault(u) ?? [])
                {
                    int v = graph.Other(l, u);
                    if (toReference.ContainsKey(v))
                    {
                        continue;
                    }
                    // Scaled by a positive factor only: the sign of w at the image's tie points then
                    // says whether they land in front of the reference plane or behind it.
                    var chained = toReference[u] * graph.Step(l, v);
                    toReference[v] = chained.Scale(1 / Math.Max(TransformOps.MaxAbs(chained), 1e-300));
                    queue.Enqueue(v);
                }
            }
            return toReference;
        }

        /// <summary>Centroid of the image's tie points over its links in the component.</summary>
        private (double X, double Y) Anchor(int image, Func<int, bool> allowed)
        {
            double sx = 0, sy = 0;
            int n = 0;
            foreach (int l in _graph!.LinksAt(image, allowed))
            {
                var (x, y) = TransformOps.Centroid(_links[l].TiePoints, _links[l].ImageA == image, sizes[image]);
                sx += x;
                sy += y;
                n++;
            }
            return n == 0 ? ((sizes[image].Width - 1) / 2.0, (sizes[image].Height - 1) / 2.0) : (sx / n, sy / n);
        }

        private bool ExcludeOffPlane(Dictionary<int, Transform2D> toReference, int reference, Func<int, bool> allowed, string stage)
        {
            bool any = false;
            foreach (var (image, t) in toReference.OrderBy(kv => kv.Key))
            {
                if (image == reference)
                {
                    continue;
                }
                string? reason = PlaneFit.Check(t, sizes[image], Anchor(image, allowed), options);
                if (reason is null)
                {
                    continue;
                }
                _excluded[image] = true;
                _exclusionReason[image] = "does not fit the reference plane: " + reason;
                _nonPlanar.Add(string.Create(CultureInfo.InvariantCulture, $"image {image} ({stage}, reference {reference}): {reason}"));
                any = true;
            }
            return any;
        }

        private static void Residuals(Transform2D toRefA, Transform2D toRefB, Correspondence[] ties, List<double> into)
        {
            if (!toRefA.TryInvert(out var fromRefA) || !toRefB.TryInvert(out var fromRefB))
            {
                foreach (var _ in ties)
                {
                    into.Add(double.PositiveInfinity);
                    into.Add(double.PositiveInfinity);
                }
                return;
            }
            var aToB = fromRefB * toRefA;
            var bToA = fromRefA * toRefB;
            foreach (var t in ties)
            {
                var (u, v) = aToB.Apply(t.X1, t.Y1);
                into.Add(TransformOps.Distance(u, v, t.X2, t.Y2));
                var (x, y) = bToA.Apply(t.X2, t.Y2);
                into.Add(TransformOps.Distance(x, y, t.X1, t.Y1));
            }
        }

        private static double Rms(List<double> values) => values.Count == 0 ? 0 : Math.Sqrt(values.Sum(v => v * v) / values.Count);

        private static double Median(List<double> values)
        {
            if (values.Count == 0)
            {
                return 0;
            }
            var sorted = values.Order().ToArray();
            int m = sorted.Length / 2;
            return sorted.Length % 2 == 1 ? sorted[m] : 0.5 * (sorted[m - 1] + sorted[m]);
        }

        private SetAlignment Finish(List<ComponentResult> results, List<int> usable)
        {
            int? named = options.ReferenceImage;
            var ordered = results
                .OrderByDescending(c => named is int n && c.Images.Contains(n))
                .ThenByDescending(c => c.Images.Length)
                .ThenBy(c => c.Images[0])
                .ToList();
            var placements = new ImagePlacement[sizes.Count];
            var components = new List<AlignmentComponent>();
            for (int ci = 0; ci < ordered.Count; ci++)
            {
                var c = ordered[ci];
                double minX = double.PositiveInfinity, minY = double.PositiveInfinity, maxX = double.NegativeInfinity, maxY = double.NegativeInfinity;
                foreach (int i in c.Images)
                {
                    var t = c.ToReference[i];
                    placements[i] = new ImagePlacement(i, t, c.Reference, ci, null);
                    foreach (var (x, y) in Transform2D.Corners(sizes[i].Width, sizes[i].Height))
                    {
                        var (u, v) = t.Apply(x, y);
                        minX = Math.Min(minX, u); minY = Math.Min(minY, v);
                        maxX = Math.Max(maxX, u); maxY = Math.Max(maxY, v);
                    }
                }
                components.Add(new AlignmentComponent(c.Reference, c.Images, new CanvasBounds(minX, minY, maxX, maxY), c.Residuals, c.Links));
            }
            var usableSet = new HashSet<int>(usable);
            for (int i = 0; i < sizes.Count; i++)
            {
                placements[i] ??= new ImagePlacement(i, null, null, null, UnplacedReason(i, usableSet));
            }
            return new SetAlignment(model, placements, components.Count > 0 ? components[0].Reference : null, [.. components],
                [.. _demoted], _nonPlanar.Count > 0, [.. _nonPlanar]);
        }

        private string UnplacedReason(int image, HashSet<int> usable)
        {
            if (_exclusionReason[image] is string r)
            {
                return r;
            }
            var mine = Enumerable.Range(0, _links.Length).Where(l => _links[l].ImageA == image || _links[l].ImageB == image).ToList();
            string kinds = options.IncludeWeakLinks ? "accepted or weak" : "accepted";
            if (!mine.Any(usable.Contains))
            {
                return mine.Count == 0 ? "no link to any other image" : $"no {kinds} link to any other image ({mine.Count} link(s), none usable)";
            }
            var live = mine.Where(l => _graph!.Active[l]).ToList();
            if (live.Count == 0)
            {
                return "every usable link of it was demoted (see the demoted links)";
            }
            if (live.All(l => _excluded[_graph!.Other(l, image)]))
            {
                return "linked only to images that do not fit the reference plane";
            }
            return "not connected to any placed image";
        }
    }
}
