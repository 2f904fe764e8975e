using Seamwright.Core.Alignment;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>
/// Starting values of a camera-rotation set: a focal length per focal group (a given one, e.g.
/// from EXIF; else the median of the pairwise estimates of Szeliski and Shum 1997, as in Brown and
/// Lowe 2007; else the best of a scan) and rotations chained along a maximum-weight spanning
/// tree from the reference, each link's relative rotation fitted to its tie points' rays
/// (orthogonal Procrustes).
/// </summary>
internal static class RotationStart
{
    /// <summary>Focal length per group and how it was found.</summary>
    public static (double[] Focal, string[] Source) Focals(IReadOnlyList<ImageSize> sizes, int[] focalGroup, IReadOnlyList<double?> givenPerGroup,
        IReadOnlyList<AlignmentLink> links)
    {
        int groups = focalGroup.Max() + 1;
        var estimates = Enumerable.Range(0, groups).Select(_ => new List<double>()).ToArray();
        foreach (var link in links)
        {
            var a = sizes[link.ImageA];
            var b = sizes[link.ImageB];
            if (FocalFromHomography.SourceFocal(link.AToB, a, b) is double fa && Plausible(fa, a))
            {
                estimates[focalGroup[link.ImageA]].Add(fa);
            }
            if (FocalFromHomography.DestinationFocal(link.AToB, a, b) is double fb && Plausible(fb, b))
            {
                estimates[focalGroup[link.ImageB]].Add(fb);
            }
        }
        var all = estimates.SelectMany(e => e).ToList();
        var focal = new double[groups];
        var source = new string[groups];
        for (int g = 0; g < groups; g++)
        {
            if (g < givenPerGroup.Count && givenPerGroup[g] is double given && given > 0)
            {
                focal[g] = given;
                source[g] = "given (image metadata)";
            }
            else if (estimates[g].Count > 0)
            {
                focal[g] = Median(estimates[g]);
                source[g] = $"median of {estimates[g].Count} pairwise estimates (Szeliski and Shum 1997)";
            }
            else if (all.Count > 0)
            {
                focal[g] = Median(all);
                source[g] = $"median of {all.Count} pairwise estimates of the other cameras";
            }
            else
            {
                focal[g] = double.NaN;
                source[g] = "scan";
            }
        }
        return (focal, source);
    }

    /// <summary>Picks, from a scan of focal lengths (diagonal x 2^(k/8)), the one whose links' rays agree best.</summary>
    public static double ScanFocal(IReadOnlyList<ImageSize> sizes, IReadOnlyList<AlignmentLink> links)
    {
        double best = double.NaN, bestCost = double.PositiveInfinity;
        double diagonal = sizes.Average(s => Math.Sqrt((double)s.Width * s.Width + (double)s.Height * s.Height));
        for (int k = -16; k <= 24; k++)
        {
            double f = diagonal * Math.Pow(2, k / 8.0);
            double cost = 0;
            foreach (var link in links)
            {
                cost += ProcrustesCost(link, sizes, f);
            }
            if (cost < bestCost)
            {
                bestCost = cost;
                best = f;
            }
        }
        return best;
    }

    /// <summary>Rotations (camera to world, the reference at identity) along a maximum-weight spanning tree.</summary>
    public static Matrix3[] Rotations(int imageCount, int reference, IReadOnlyList<(AlignmentLink Link, Correspondence[] Ties)> links,
        Func<int, double, double, (double X, double Y, double Z)> ray)
    {
        var parent = Enumerable.Range(0, imageCount).ToArray();
        int Find(int i)
        {
            while (parent[i] != i)
            {
                parent[i] = parent[parent[i]];
                i = parent[i];
            }
            return i;
        }
        var tree = Enumerable.Range(0, imageCount).Select(_ => new List<int>()).ToArray();
        foreach (int l in Enumerable.Range(0, links.Count).OrderByDescending(l => links[l].Link.Weight).ThenBy(l => l))
        {
            int a = links[l].Link.ImageA, b = links[l].Link.ImageB;
            int ra = Find(a), rb = Find(b);
            if (ra == rb)
            {
                continue;
            }
            parent[ra] = rb;
            tree[a].Add(l);
            tree[b].Add(l);
        }
        var rotations = new Matrix3[imageCount];
        var placed = new bool[imageCount];
        rotations[reference] = Matrix3.Identity;
        placed[reference] = true;
        var queue = new Queue<int>();
        queue.Enqueue(reference);
        while (queue.Count > 0)
        {
            int u = queue.Dequeue();
            foreach (int l in tree[u])
            {
                var (link, ties) = links[l];
                int v = link.ImageA == u ? link.ImageB : link.ImageA;
                if (placed[v])
                {
                    continue;
                }
                // q maps rays of A to rays of B: R_A d_A = R_B d_B, so d_B = R_B^T R_A d_A.
                var q = RelativeRotation(link, ties, ray);
                rotations[v] = link.ImageA == u ? rotations[u] * q.Transpose() : rotations[u] * q;
                placed[v] = true;
                queue.Enqueue(v);
            }
        }
        return rotations;
    }

    /// <summary>The rotation taking A's rays to B's rays that fits the tie points best (orthogonal Procrustes).</summary>
    public static Matrix3 RelativeRotation(AlignmentLink link, Correspondence[] ties, Func<int, double, double, (double X, double Y, double Z)> ray)
    {
        double m11 = 0, m12 = 0, m13 = 0, m21 = 0, m22 = 0, m23 = 0, m31 = 0, m32 = 0, m33 = 0;
        foreach (var t in ties)
        {
            var (ax, ay, az) = ray(link.ImageA, t.X1, t.Y1);
            var (bx, by, bz) = ray(link.ImageB, t.X2, t.Y2);
            m11 += bx * ax; m12 += bx * ay; m13 += bx * az;
            m21 += by * ax; m22 += by * ay; m23 += by * az;
            m31 += bz * ax; m32 += bz * ay; m33 += bz * az;
        }
        return new Matrix3(m11, m12, m13, m21, m22, m23, m31, m32, m33).NearestRotation();
    }

    private static double ProcrustesCost(AlignmentLink link, IReadOnlyList<ImageSize> sizes, double f)
    {
        (double, double, double) Ray(int image, double u, double v)
        {
            double x = (u - (sizes[image].Width - 1) / 2.0) / f, y = (v - (sizes[image].Height - 1) / 2.0) / f;
            double n = Math.Sqrt(x * x + y * y + 1);
            return (x / n, y / n, 1 / n);
        }
        var q = RelativeRotation(link, link.TiePoints, Ray);
        double cost = 0;
        foreach (var t in link.TiePoints)
        {
            var (ax, ay, az) = Ray(link.ImageA, t.X1, t.Y1);
            var (bx, by, bz) = Ray(link.ImageB, t.X2, t.Y2);
            var (px, py, pz) = q.Apply(ax, ay, az);
            double d2 = f * f * ((px - bx) * (px - bx) + (py - by) * (py - by) + (pz - bz) * (pz - bz));
            cost += Math.Log(1 + d2 / 4);
        }
        return cost;
    }

    private static bool Plausible(double f, ImageSize size)
    {
        double diagonal = Math.Sqrt((double)size.Width * size.Width + (double)size.Height * size.Height);
        return f > 0.05 * diagonal && f < 50 * diagonal;
    }

    internal static double Median(List<double> values)
    {
        var sorted = values.Order().ToArray();
        int n = sorted.Length;
        return n == 0 ? double.NaN : n % 2 == 1 ? sorted[n / 2] : 0.5 * (sorted[n / 2 - 1] + sorted[n / 2]);
    }
}
