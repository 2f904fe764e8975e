using BenchmarkDotNet.Attributes;
using BenchmarkDotNet.Jobs;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// Per-pair estimate time on the 16 homogr match files (Lebeda, Matas, Chum, BMVC 2012), with and
/// without the consensus refinement, one thread. The target: median at most 50 ms per pair
/// with refinement. Run: dotnet run -c Release --project tests/Seamwright.Benchmarks -- --filter '*PairEstimate*'
/// </summary>
[SimpleJob(RuntimeMoniker.Net10_0, warmupCount: 2, iterationCount: 5)]
public class PairEstimateBenchmarks
{
    private Dictionary<string, (Correspondence[] Matches, ImageSize A, ImageSize B)> _pairs = [];

    public static IEnumerable<string> PairNames() =>
        HomogrSet.TryLoad()?.Select(p => p.Name) ?? throw new InvalidOperationException("homogr set missing at " + RepoPaths.HomogrFolder);

    [ParamsSource(nameof(PairNames))]
    public string Pair { get; set; } = "";

    [Params(true, false)]
    public bool Refine { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        _pairs = HomogrSet.TryLoad()!.ToDictionary(p => p.Name, p => (p.Tentative, Bounds(p.Tentative.Select(m => (m.X1, m.Y1))), Bounds(p.Tentative.Select(m => (m.X2, m.Y2)))));
    }

    [Benchmark]
    public int Estimate()
    {
        var (matches, a, b) = _pairs[Pair];
        return PairEstimator.Estimate(matches, a, b, EstimationOptions.Default with { Refine = Refine }).Consensus.Final;
    }

    private static ImageSize Bounds(IEnumerable<(double X, double Y)> points)
    {
        double w = 1, h = 1;
        foreach (var (x, y) in points)
        {
            w = Math.Max(w, x + 1);
            h = Math.Max(h, y + 1);
        }
        return new ImageSize((int)Math.Ceiling(w), (int)Math.Ceiling(h));
    }
}
