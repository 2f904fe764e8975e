using BenchmarkDotNet.Attributes;
using BenchmarkDotNet.Configs;
using BenchmarkDotNet.Jobs;
using BenchmarkDotNet.Toolchains.InProcess.Emit;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Tests.Estimation;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// Per-pair estimate time on the 16 homogr match files (label-0 rows), plain RANSAC at 3 px with and
/// without the consensus refinement (the LP share comes from eval-refiner). In-process, short job.
/// Run: dotnet run -c Release --project tests/Seamwright.Benchmarks -- --filter '*RefinerBenchmarks*'
/// </summary>
[Config(typeof(OneCoreShortConfig))]
public class RefinerBenchmarks
{
    private const double Threshold = 3;
    private Correspondence[] _matches = [];

    public static IEnumerable<string> PairNames() =>
        HomogrSet.TryLoad()?.Select(p => p.Name) ?? throw new InvalidOperationException("homogr set missing at " + RepoPaths.HomogrFolder);

    [ParamsSource(nameof(PairNames))]
    public string Pair { get; set; } = "";

    [GlobalSetup]
    public void Setup()
    {
        var pair = HomogrSet.TryLoad()!.Single(p => p.Name == Pair);
        _matches = pair.Tentative;
    }

    [Benchmark(Baseline = true)]
    public Transform2D Sampling() => PlainRansac.Estimate(_matches, MotionModel.Homography, Threshold, 1, 10_000).Model;

    [Benchmark]
    public Transform2D SamplingAndRefinement()
    {
        var initial = PlainRansac.Estimate(_matches, MotionModel.Homography, Threshold, 1, 10_000).Model;
        return ConsensusRefiner.Refine(_matches, initial, MotionModel.Homography, Threshold, new ConsensusRefinerOptions()).Transform;
    }

    private sealed class OneCoreShortConfig : ManualConfig
    {
        public OneCoreShortConfig() =>
            // In-process: the separate boilerplate build timed out on the shared, loaded machine.
            // The estimate is single-threaded, so one thread is what gets measured.
            AddJob(Job.Default.WithToolchain(InProcessEmitToolchain.Instance).WithLaunchCount(1).WithWarmupCount(2).WithIterationCount(7)
                .WithIterationTime(Perfolizer.Horology.TimeInterval.FromMilliseconds(200)));
    }
}
