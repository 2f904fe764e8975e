using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>
/// The usable links of a set as a graph over image indices, with each link's transform in both
/// directions (oriented so w stays positive at the link's own tie points).
/// </summary>
internal sealed class LinkGraph
{
    private readonly List<int>[] _adjacent;

    public LinkGraph(IReadOnlyList<ImageSize> sizes, IReadOnlyList<AlignmentLink> links, IReadOnlyList<int> usable, MotionModel? fitModel = null, double robustScalePx = 2)
    {
        Sizes = sizes;
        Links = links;
        _adjacent = new List<int>[sizes.Count];
        for (int i = 0; i < sizes.Count; i++)
        {
            _adjacent[i] = [];
        }
        Forward = new Transform2D[links.Count];
        Backward = new Transform2D[links.Count];
        FittedForward = new Transform2D[links.Count];
        FittedBackward = new Transform2D[links.Count];
        // Each link's orientation and fit on its own (in parallel; each writes only its own slots).
        var usableLinks = usable.ToArray();
        Parallel.For(0, usableLinks.Length, k => OrientAndFit(usableLinks[k], fitModel, robustScalePx));
        foreach (int l in usableLinks)
        {
            _adjacent[links[l].ImageA].Add(l);
            _adjacent[links[l].ImageB].Add(l);
        }
        Active = new bool[links.Count];
        foreach (int l in usable)
        {
            Active[l] = true;
        }
    }

    private void OrientAndFit(int l, MotionModel? fitModel, double robustScalePx)
    {
        var link = Links[l];
        var (ax, ay) = TransformOps.Centroid(link.TiePoints, first: true, Sizes[link.ImageA]);
        var (bx, by) = TransformOps.Centroid(link.TiePoints, first: false, Sizes[link.ImageB]);
        Forward[l] = TransformOps.Orient(link.AToB, ax, ay);
        TransformOps.TryOrientedInverse(link.AToB, bx, by, out Backward[l]);
        FittedForward[l] = Forward[l];
        FittedBackward[l] = Backward[l];
        if (fitModel is MotionModel m && link.TiePoints.Length >= 2 * ModelParameters.Count(m))
        {
            // Least-squares fit of the link to its own tie points (reference A): the cycle check
            // measures what the tie points say, not how a rough estimate extrapolates.
            var fit = new JointRefiner(m, Sizes, link.ImageA, [link.ImageA, link.ImageB], [(link.ImageA, link.ImageB, link.TiePoints)], robustScalePx, robustScalePx)
                .Solve(new Dictionary<int, Transform2D> { [link.ImageA] = Transform2D.Identity, [link.ImageB] = Backward[l] }, 30, adaptScale: false);
            var bToA = fit.ToReference[link.ImageB];
            if (bToA.IsFinite && TransformOps.TryOrientedInverse(bToA, ax, ay, out var aToB))
            {
                FittedBackward[l] = TransformOps.Orient(bToA, bx, by);
                FittedForward[l] = aToB;
            }
        }
    }

    public IReadOnlyList<ImageSize> Sizes { get; }

    public IReadOnlyList<AlignmentLink> Links { get; }

    /// <summary>Links still in use (demotion clears the flag).</summary>
    public bool[] Active { get; }

    /// <summary>A to B of each usable link, fitted to its tie points (the given transform when it has too few).</summary>
    public Transform2D[] FittedForward { get; }

    /// <summary>B to A of each usable link, fitted to its tie points.</summary>
    public Transform2D[] FittedBackward { get; }

    /// <summary>Fitted transform taking pixels of <paramref name="from"/> to pixels of the other end of the link.</summary>
    public Transform2D FittedStep(int link, int from) => Links[link].ImageA == from ? FittedForward[link] : FittedBackward[link];

    /// <summary>A to B of each usable link.</summary>
    public Transform2D[] Forward { get; }

    /// <summary>B to A of each usable link.</summary>
    public Transform2D[] Backward { get; }

    public int ImageCount => Sizes.Count;

    /// <summary>Active links at an image, ascending by link index.</summary>
    public IEnumerable<int> LinksAt(int image, Func<int, bool>? imageAllowed = null)
    {
        foreach (int l in _adjacent[image])
        {
            if (Active[l] && (imageAllowed is null || imageAllowed(Other(l, image))))
            {
                yield return l;
            }
        }
    }

    public int Other(int link, int image) => Links[link].ImageA == image ? Links[link].ImageB : Links[link].ImageA;

    /// <summary>Transform taking pixels of <paramref name="from"/> to pixels of the other end of the link.</summary>
    public Transform2D Step(int link, int from) => Links[link].ImageA == from ? Forward[link] : Backward[link];

    /// <summary>Connected components over allowed images (ascending members; order by smallest member).</summary>
    public List<int[]> Components(Func<int, bool> imageAllowed)
    {
        var seen = new bool[ImageCount];
        var result = new List<int[]>();
        for (int s = 0; s < ImageCount; s++)
        {
            if (seen[s] || !imageAllowed(s))
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
                foreach (int l in LinksAt(u, imageAllowed))
                {
                    int v = Other(l, u);
                    if (!seen[v])
                    {
                        seen[v] = true;
                        queue.Enqueue(v);
                    }
                }
            }
            members.Sort();
            result.Add([.. members]);
        }
        return result;
    }

    /// <summary>Number of active links at the image among allowed images, and their total weight.</summary>
    public (int Degree, double Weight) Connectivity(int image, Func<int, bool> imageAllowed)
    {
        int d = 0;
        double w = 0;
        foreach (int l in LinksAt(image, imageAllowed))
        {
            d++;
            w += Links[l].Weight;
        }
        return (d, w);
    }
}
