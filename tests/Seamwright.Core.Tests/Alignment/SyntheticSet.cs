using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Tests.Alignment;

/// <summary>Deterministic test noise (splitmix64 with Box-Muller), never System.Random.</summary>
internal sealed class TestNoise(ulong seed)
{
    private ulong _state = seed;

    public double Uniform()
    {
        ulong z = _state += 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        z ^= z >> 31;
        return ((z >> 11) + 0.5) / (1UL << 53);
    }

    public double Gaussian(double sigma) => sigma * Math.Sqrt(-2 * Math.Log(Uniform())) * Math.Cos(2 * Math.PI * Uniform());
}

/// <summary>
/// A set with known truth: each image's transform into a common world frame. Links carry tie
/// points with small noise and a pairwise transform re-estimated from a few noisier points, as a
/// pairwise estimator over a narrow overlap would give.
/// </summary>
internal sealed class SyntheticSet
{
    public SyntheticSet(ImageSize size, Transform2D[] toWorld, ulong seed)
    {
        Size = size;
        ToWorld = toWorld;
        Noise = new TestNoise(seed);
    }

    public ImageSize Size { get; }

    public Transform2D[] ToWorld { get; }

    public TestNoise Noise { get; }

    public List<AlignmentLink> Links { get; } = [];

    public ImageSize[] Sizes => [.. ToWorld.Select(_ => Size)];

    /// <summary>True A-to-B transform.</summary>
    public Transform2D Truth(int a, int b)
    {
        // Inverse() scales to m33 = 1, which can flip the sign for a turned camera: keep w > 0 at the centre.
        var h = ToWorld[b].Inverse() * ToWorld[a];
        return h.W((Size.Width - 1) / 2.0, (Size.Height - 1) / 2.0) < 0 ? h.Scale(-1) : h;
    }

    /// <summary>Adds a true link (tie noise sigma px; pairwise estimate from 4 points perturbed by estimateSigma px).</summary>
    public void AddLink(int a, int b, double tieSigma = 0.3, double estimateSigma = 1.0, int maxTies = 60)
    {
        var ties = TiePoints(a, b, Truth(a, b), tieSigma, maxTies);
        Assert.True(ties.Length >= 8, $"images {a} and {b} barely overlap ({ties.Length} tie points)");
        Links.Add(new AlignmentLink(a, b, NoisyEstimate(ties, estimateSigma), ties, PairStatus.Accepted, ties.Length));
    }

    /// <summary>Adds a false link: a wrong transform, tie points that agree with it, a high weight.</summary>
    public void AddFalseLink(int a, int b, Transform2D wrongAToB, double weight, PairStatus status = PairStatus.Accepted)
    {
        var ties = TiePoints(a, b, wrongAToB, 0.3, 60);
        Links.Add(new AlignmentLink(a, b, wrongAToB, ties, status, weight));
    }

    private Correspondence[] TiePoints(int a, int b, Transform2D aToB, double sigma, int max)
    {
        var all = new List<Correspondence>();
        const int n = 24;
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j < n; j++)
            {
                double x = (Size.Width - 1) * (i + 0.5) / n, y = (Size.Height - 1) * (j + 0.5) / n;
                if (aToB.W(x, y) <= 0)
                {
                    continue;
                }
                var (u, v) = aToB.Apply(x, y);
                if (u >= 2 && v >= 2 && u <= Size.Width - 3 && v <= Size.Height - 3)
                {
                    all.Add(new Correspondence(x + Noise.Gaussian(sigma), y + Noise.Gaussian(sigma), u + Noise.Gaussian(sigma), v + Noise.Gaussian(sigma)));
                }
            }
        }
        if (all.Count <= max)
        {
            return [.. all];
        }
        return [.. Enumerable.Range(0, max).Select(k => all[k * all.Count / max])];
    }

    /// <summary>Four extreme tie points perturbed, solved exactly: a deliberately rough pairwise estimate.</summary>
    private Transform2D NoisyEstimate(Correspondence[] ties, double sigma)
    {
        var picks = new[]
        {
            ties.MinBy(t => t.X1 + t.Y1), ties.MaxBy(t => t.X1 - t.Y1), ties.MaxBy(t => t.X1 + t.Y1), ties.MinBy(t => t.X1 - t.Y1),
        };
        var noisy = picks.Select(t => t with { X2 = t.X2 + Noise.Gaussian(sigma), Y2 = t.Y2 + Noise.Gaussian(sigma) }).ToArray();
        return FourPoint.Solve(noisy);
    }

    /// <summary>Mean and largest corner distance (reference px) between placements and the truth, relative to the aligner's reference.</summary>
    public (double Mean, double Max) CornerError(SetAlignment result, Func<int, Transform2D?> placement)
    {
        int reference = result.Reference!.Value;
        var worldToRef = ToWorld[reference].Inverse();
        if (worldToRef.Multiply(ToWorld[reference]).M33 < 0)
        {
            worldToRef = worldToRef.Scale(-1);
        }
        double sum = 0, max = 0;
        int n = 0;
        foreach (var p in result.Images)
        {
            var t = placement(p.Index);
            if (t is null)
            {
                continue;
            }
            var truth = worldToRef * ToWorld[p.Index];
            foreach (var (x, y) in Transform2D.Corners(Size.Width, Size.Height))
            {
                var (u, v) = t.Value.Apply(x, y);
                var (tu, tv) = truth.Apply(x, y);
                double d = Math.Sqrt((u - tu) * (u - tu) + (v - tv) * (v - tv));
                sum += d;
                max = Math.Max(max, d);
                n++;
            }
        }
        return (sum / n, max);
    }

    /// <summary>A similarity with a mild perspective term, placing an image in the world.</summary>
    public static Transform2D Place(double x, double y, double degrees, double scale = 1, double px = 0, double py = 0)
    {
        double c = scale * Math.Cos(degrees * Math.PI / 180), s = scale * Math.Sin(degrees * Math.PI / 180);
        return new Transform2D(c, -s, x, s, c, y, px, py, 1);
    }
}

/// <summary>Exact homography through four correspondences (8x8 linear system, partial pivoting).</summary>
internal static class FourPoint
{
    public static Transform2D Solve(IReadOnlyList<Correspondence> m)
    {
        var a = new double[8, 9];
        for (int i = 0; i < 4; i++)
        {
            var (x, y, u, v) = (m[i].X1, m[i].Y1, m[i].X2, m[i].Y2);
            double[] r1 = [x, y, 1, 0, 0, 0, -u * x, -u * y, u];
            double[] r2 = [0, 0, 0, x, y, 1, -v * x, -v * y, v];
            for (int j = 0; j < 9; j++)
            {
                a[2 * i, j] = r1[j];
                a[2 * i + 1, j] = r2[j];
            }
        }
        for (int col = 0; col < 8; col++)
        {
            int pivot = col;
            for (int r = col + 1; r < 8; r++)
            {
                if (Math.Abs(a[r, col]) > Math.Abs(a[pivot, col]))
                {
                    pivot = r;
                }
            }
            for (int j = 0; j < 9; j++)
            {
                (a[col, j], a[pivot, j]) = (a[pivot, j], a[col, j]);
            }
            for (int r = 0; r < 8; r++)
            {
                if (r == col)
                {
                    continue;
                }
                double f = a[r, col] / a[col, col];
                for (int j = col; j < 9; j++)
                {
                    a[r, j] -= f * a[col, j];
                }
            }
        }
        var h = new double[9];
        for (int i = 0; i < 8; i++)
        {
            h[i] = a[i, 8] / a[i, i];
        }
        h[8] = 1;
        return Transform2D.FromRowMajor(h);
    }
}
