using BenchmarkDotNet.Attributes;
using OpenCvSharp;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// Per-pair time of `pair` against the OpenCV ORB pipeline on each homogr pair, decoding included,
/// one thread. The `pairs` mode of Program prints the same comparison with stage breakdown and accuracy.
/// </summary>
[MemoryDiagnoser]
[SimpleJob(warmupCount: 2, iterationCount: 5)]
public class PairBenchmarks
{
    private BenchmarkPair _pair = null!;

    public static IEnumerable<string> Names => HomogrSet.TryLoad()?.Select(p => p.Name) ?? [];

    [ParamsSource(nameof(Names))]
    public string Pair { get; set; } = "";

    [GlobalSetup]
    public void Setup()
    {
        Cv2.SetNumThreads(1);
        _pair = BenchmarkPair.Homogr(HomogrSet.TryLoad()!).Single(p => p.Name == Pair);
    }

    [Benchmark(Baseline = true)]
    public double OpenCvOrb() => PairPipelines.OpenCvOrb(_pair).ErrorPx;

    [Benchmark]
    public double Seamwright() => PairPipelines.Seamwright(_pair).ErrorPx;
}
