using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Synthetic;

/// <summary>
/// Links of a synthetic tile grid with a known similarity per tile, for tests and benchmarks of
/// the set stages without images: cols x rows tiles of 640 x 480, 520 x 390 apart (120 and 90 px
/// overlaps), each turned and scaled by up to +-jitter/2, linked to its eight neighbours where at
/// least 20 of <paramref name="tiesPerLink"/> random points of A land inside B (the diagonal
/// neighbours rarely do); tie points with 0.1 px Gaussian noise.
/// </summary>
public static class GridLinks
{
    public static (ImageSize[] Sizes, List<AlignmentLink> Links) Make(int cols, int rows, double jitter, ulong seed, int tiesPerLink = 300)
    {
        var rng = new SyntheticRandom(seed);
        int n = cols * rows;
        var toScene = new Transform2D[n];
        for (int k = 0; k < n; k++)
        {
            double angle = jitter * (rng.NextDouble() - 0.5), scale = 1 + jitter * (rng.NextDouble() - 0.5);
            double c = scale * Math.Cos(angle), s = scale * Math.Sin(angle);
            toScene[k] = new Transform2D(c, -s, 520 * (k % cols), s, c, 390 * (k / cols), 0, 0, 1);
        }
        var links = new List<AlignmentLink>();
        for (int a = 0; a < n; a++)
        {
            foreach (int b in new[] { a + 1, a + cols - 1, a + cols, a + cols + 1 })
            {
                if (b >= n || Math.Abs(a % cols - b % cols) > 1)
                {
                    continue;
                }
                var aToB = (toScene[b].Inverse() * toScene[a]).Normalized();
                var ties = new List<Correspondence>();
                for (int i = 0; i < tiesPerLink; i++)
                {
                    double x = 639 * rng.NextDouble(), y = 479 * rng.NextDouble();
                    var (u, v) = aToB.Apply(x, y);
                    if (u >= 0 && u <= 639 && v >= 0 && v <= 479)
                    {
                        ties.Add(new Correspondence(x, y, u + 0.1 * rng.NextGaussian(), v + 0.1 * rng.NextGaussian()));
                    }
                }
                if (ties.Count >= 20)
                {
                    links.Add(new AlignmentLink(a, b, aToB, [.. ties], PairStatus.Accepted, ties.Count));
                }
            }
        }
        links.Sort((x, y) => (x.ImageA, x.ImageB).CompareTo((y.ImageA, y.ImageB)));
        return ([.. Enumerable.Repeat(new ImageSize(640, 480), n)], links);
    }
}
