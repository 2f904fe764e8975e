using BenchmarkDotNet.Attributes;
using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Benchmarks;

/// <summary>
/// Set alignment of a square grid of tiles (4-neighbour links, 40 exact tie points each, a small
/// perturbation of every pairwise transform so the joint refinement has work to do).
/// </summary>
[MemoryDiagnoser]
public class AlignmentBenchmarks
{
    private ImageSize[] _sizes = [];
    private List<AlignmentLink> _links = [];

    [Params(5, 10)]
    public int Side { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        var size = new ImageSize(800, 600);
        var toWorld = new Transform2D[Side * Side];
        for (int r = 0; r < Side; r++)
        {
            for (int c = 0; c < Side; c++)
            {
                double a = 0.01 * ((r + c) % 3 - 1);
                toWorld[r * Side + c] = new Transform2D(Math.Cos(a), -Math.Sin(a), c * 580, Math.Sin(a), Math.Cos(a), r * 430, 1e-6 * c, -1e-6 * r, 1);
            }
        }
        _sizes = [.. toWorld.Select(_ => size)];
        _links = [];
        for (int i = 0; i < toWorld.Length; i++)
        {
            foreach (int j in new[] { i + 1, i + Side })
            {
                if (j >= toWorld.Length || (j == i + 1 && j % Side == 0))
                {
                    continue;
                }
                var truth = toWorld[j].Inverse() * toWorld[i];
                var ties = new List<Correspondence>();
                for (int y = 10; y < size.Height && ties.Count < 40; y += 37)
                {
                    for (int x = 10; x < size.Width && ties.Count < 40; x += 29)
                    {
                        var (u, v) = truth.Apply(x, y);
                        if (u >= 0 && v >= 0 && u < size.Width && v < size.Height)
                        {
                            ties.Add(new Correspondence(x, y, u, v));
                        }
                    }
                }
                var rough = Transform2D.Translation(0.7, -0.4) * truth;
                _links.Add(new AlignmentLink(i, j, rough, [.. ties], PairStatus.Accepted, ties.Count));
            }
        }
    }

    [Benchmark]
    public SetAlignment AlignGrid() => SetAligner.Align(_sizes, _links, MotionModel.Homography);
}
