using System.Globalization;
using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>
/// The camera-rotation set model: every image is a view of one camera turning about its centre
/// (panoramas, sweeps from a tripod head). Per image a 3D rotation, a focal length per camera
/// (or per image) and optional radial distortion per camera, principal point at the image centre.
/// Steps: the links' largest component and its reference, starting focal lengths and rotations
/// (<see cref="RotationStart"/>), joint refinement over the tie points as rays
/// (<see cref="RotationBundle"/>), a re-check of every link (leave out, solve again), levelling
/// (<see cref="Levelling"/>). Loop closure needs nothing special: the link of the last frame with
/// the first is one more link in the joint refinement. Deterministic: no randomness.
/// </summary>
public static class RotationSetSolver
{
    /// <param name="sizes">Image sizes (as displayed).</param>
    /// <param name="cameraOf">Camera of each image (same size and make/model share one), dense from 0.</param>
    /// <param name="links">Pairwise results; accepted links are used (and weak ones when <paramref name="includeWeak"/>).</param>
    /// <param name="givenFocal">Known focal length per camera in pixels (e.g. from EXIF), or null entries.</param>
    public static RotationSetSolution Solve(IReadOnlyList<ImageSize> sizes, IReadOnlyList<int> cameraOf, IReadOnlyList<AlignmentLink> links,
        RotationSetOptions? options = null, IReadOnlyList<double?>? givenFocal = null, bool includeWeak = false)
    {
        ArgumentNullException.ThrowIfNull(sizes);
        ArgumentNullException.ThrowIfNull(cameraOf);
        ArgumentNullException.ThrowIfNull(links);
        options ??= new RotationSetOptions();
        options.Validate();
        if (options.Distortion == DistortionTerms.Auto)
        {
            var plain = Solve(sizes, cameraOf, links, options with { Distortion = DistortionTerms.None }, givenFocal, includeWeak);
            var withK1 = Solve(sizes, cameraOf, links, options with { Distortion = DistortionTerms.K1 }, givenFocal, includeWeak);
            return DistortionChoice.Prefer(plain, withK1, cameraOf.Count == 0 ? 1 : cameraOf.Max() + 1);
        }
        int n = sizes.Count;
        if (cameraOf.Count != n || cameraOf.Any(c => c < 0))
        {
            throw new ArgumentException("One non-negative camera index per image is needed.", nameof(cameraOf));
        }
        var lensGroup = cameraOf.ToArray();
        var focalGroup = options.FocalPerImage ? Enumerable.Range(0, n).ToArray() : lensGroup;
        var usable = links
            .Where(l => l.Status == PairStatus.Accepted || (includeWeak && l.Status == PairStatus.Weak))
            .Where(l => l.ImageA >= 0 && l.ImageA < n && l.ImageB >= 0 && l.ImageB < n && l.ImageA != l.ImageB && l.TiePoints.Length >= 3)
            .Select(l => l with { TiePoints = Subsample(l.TiePoints, options.MaxTiePointsPerLink) })
            .ToList();
        usable = CycleConsistent(sizes, usable, out var inconsistent);
        var given = options.FocalPerImage
            ? Enumerable.Range(0, n).Select(i => givenFocal is not null && cameraOf[i] < givenFocal.Count ? givenFocal[cameraOf[i]] : null).ToArray()
            : givenFocal?.ToArray() ?? [];
        var (focal, sources) = RotationStart.Focals(sizes, focalGroup, given, usable);
        if (focal.Any(double.IsNaN))
        {
            double scanned = RotationStart.ScanFocal(sizes, usable);
            for (int g = 0; g < focal.Length; g++)
            {
                if (double.IsNaN(focal[g]))
                {
                    focal[g] = scanned;
                    sources[g] = "best agreement over a scan of focal lengths";
                }
            }
        }
        var leftOut = inconsistent;
        var active = usable.ToList();
        RotationBundle.State state;
        RotationBundle bundle;
        int[] members;
        int reference;
        int iterations = 0;
        double initialRms = 0;
        for (int round = 0; ; round++)
        {
            (members, reference) = MainComponent(n, active, options.ReferenceImage);
            var inside = new HashSet<int>(members);
            var componentLinks = active.Where(l => inside.Contains(l.ImageA) && inside.Contains(l.ImageB)).ToList();
            var lens = Enumerable.Repeat(LensDistortion.None, lensGroup.Max() + 1).ToArray();
            state = new RotationBundle.State(new Matrix3[n], (double[])focal.Clone(), lens);
            var ties = componentLinks.Select(l => (l.ImageA, l.ImageB, l.TiePoints)).ToList();
            bundle = new RotationBundle(sizes, focalGroup, lensGroup, reference, members, ties, options.Distortion, options.RobustScalePx);
            var b = bundle;
            var s0 = state;
            var start = RotationStart.Rotations(n, reference, [.. componentLinks.Select(l => (l, l.TiePoints))], (i, u, v) => b.LocalRay(s0, i, u, v));
            for (int i = 0; i < n; i++)
            {
                state.Rotations[i] = inside.Contains(i) ? start[i] : Matrix3.Identity;
            }
            initialRms = Rms(bundle, state, componentLinks.Count);
            iterations = bundle.Solve(state, options.MaxIterations);
            bool changed = false;
            if (round < options.MaxRounds - 1)
            {
                // One link per round, the worst: a false link in the starting tree drags its
                // neighbours off too, and they come back once it is gone.
                int worst = -1;
                double worstMedian = options.LinkResidualLimitPx;
                for (int l = 0; l < componentLinks.Count; l++)
                {
                    double median = RotationStart.Median([.. bundle.LinkResiduals(state, l)]);
                    if (median > worstMedian)
                    {
                        worst = l;
                        worstMedian = median;
                    }
                }
                if (worst >= 0)
                {
                    active.Remove(componentLinks[worst]);
                    leftOut.Add(new LeftOutLink(componentLinks[worst].ImageA, componentLinks[worst].ImageB, string.Create(CultureInfo.InvariantCulture,
                        $"disagrees with the rotation solution: median tie-point residual {worstMedian:0.##} px (limit {options.LinkResidualLimitPx} px)")));
                    changed = true;
                }
            }
            if (!changed)
            {
                var residuals = Figures(bundle, state, componentLinks.Count, initialRms, iterations);
                return Finish(sizes, members, reference, state, focalGroup, lensGroup, residuals, leftOut, sources, options, active);
            }
        }
    }

    private static RotationSetSolution Finish(IReadOnlyList<ImageSize> sizes, int[] members, int reference, RotationBundle.State state,
        int[] focalGroup, int[] lensGroup, RotationResiduals residuals, List<LeftOutLink> leftOut, string[] sources, RotationSetOptions options,
        List<AlignmentLink> active)
    {
        int n = sizes.Count;
        var (g, angle) = options.Level ? Levelling.Find([.. members.Select(i => state.Rotations[i])]) : (Matrix3.Identity, 0.0);
        var poses = new CameraPose?[n];
        var reasons = new string?[n];
        var inside = new HashSet<int>(members);
        for (int i = 0; i < n; i++)
        {
            if (!inside.Contains(i))
            {
                bool linked = active.Any(l => l.ImageA == i || l.ImageB == i);
                reasons[i] = linked ? "not connected to the main group of linked images" : "no usable link to any other image";
                continue;
            }
            poses[i] = new CameraPose(i, g * state.Rotations[i], state.Focal[focalGroup[i]],
                (sizes[i].Width - 1) / 2.0, (sizes[i].Height - 1) / 2.0, state.Lens[lensGroup[i]]);
        }
        return new RotationSetSolution(poses, reasons, reference, residuals, [.. leftOut], angle * 180 / Math.PI, sources);
    }

    private static double Rms(RotationBundle bundle, RotationBundle.State state, int links)
    {
        var all = Enumerable.Range(0, links).SelectMany(l => bundle.LinkResiduals(state, l)).ToArray();
        return all.Length == 0 ? 0 : Math.Sqrt(all.Sum(r => r * r) / all.Length);
    }

    private static RotationResiduals Figures(RotationBundle bundle, RotationBundle.State state, int links, double initialRms, int iterations)
    {
        var all = Enumerable.Range(0, links).SelectMany(l => bundle.LinkResiduals(state, l)).ToList();
        if (all.Count == 0)
        {
            return new RotationResiduals(0, links, 0, 0, 0, 0, iterations);
        }
        return new RotationResiduals(all.Count, links, initialRms, Math.Sqrt(all.Sum(r => r * r) / all.Count), RotationStart.Median(all), all.Max(), iterations);
    }

    /// <summary>Largest connected component of the links (ties: the one holding the lowest index) and its reference.</summary>
    private static (int[] Members, int Reference) MainComponent(int n, List<AlignmentLink> links, int? named)
    {
        var adjacent = Enumerable.Range(0, n).Select(_ => new List<AlignmentLink>()).ToArray();
        foreach (var l in links)
        {
            adjacent[l.ImageA].Add(l);
            adjacent[l.ImageB].Add(l);
        }
        var seen = new bool[n];
        int[] best = [];
        for (int s = 0; s < n; s++)
        {
            if (seen[s])
            {
                continue;
            }
            var members = new List<int>();
            var queue = new Queue<int>();
            queue.Enqueue(s);
            seen[s] = true;
            while (queue.Count > 0)
            {
                int u = queue.Dequeue();
                members.Add(u);
                foreach (var l in adjacent[u])
                {
                    int v = l.ImageA == u ? l.ImageB : l.ImageA;
                    if (!seen[v])
                    {
                        seen[v] = true;
                        queue.Enqueue(v);
                    }
                }
            }
            bool hasNamed = named is int r && members.Contains(r);
            if (members.Count > best.Length || hasNamed)
            {
                best = [.. members.Order()];
                if (hasNamed)
                {
                    break;
                }
            }
        }
        if (named is int nr && best.Contains(nr))
        {
            return (best, nr);
        }
        // Most links, then the larger total weight, then the lowest index.
        int reference = best.OrderByDescending(i => adjacent[i].Count).ThenByDescending(i => adjacent[i].Sum(l => l.Weight)).ThenBy(i => i).First();
        return (best, reference);
    }

    /// <summary>
    /// The cycle check of the planar alignment (<see cref="CycleCheck"/>) on the links'
    /// homographies, which compose exactly for a rotating camera: a false link is found before it
    /// can misplace the starting tree.
    /// </summary>
    private static List<AlignmentLink> CycleConsistent(IReadOnlyList<ImageSize> sizes, List<AlignmentLink> links, out List<LeftOutLink> leftOut)
    {
        // The links' own homographies (already fitted to their tie points by the pair stage's polish).
        var graph = new LinkGraph(sizes, links, [.. Enumerable.Range(0, links.Count)]);
        var demoted = CycleCheck.Run(graph, new AlignmentOptions());
        leftOut = [.. demoted.Select(d => new LeftOutLink(d.ImageA, d.ImageB, d.Reason))];
        return [.. Enumerable.Range(0, links.Count).Where(l => graph.Active[l]).Select(l => links[l])];
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
}
