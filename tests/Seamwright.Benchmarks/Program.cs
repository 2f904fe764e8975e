using System.Globalization;
using BenchmarkDotNet.Running;

namespace Seamwright.Benchmarks;

internal static class Program
{
    public static int Main(string[] args)
    {
        if (args.Length > 0 && args[0] == "pairs")
        {
            return PairComparisonReport.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "scale")
        {
            return Scale.ScaleBenchmark.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "nodes")
        {
            return Scale.NodesBenchmark.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "shoots")
        {
            return Scale.ShootsBenchmark.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "profile-pairs")
        {
            return Scale.PairProfile.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "profile-forecast")
        {
            return Scale.ForecastProfile.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "sweep-links")
        {
            return Scale.SweepLinks.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "profile-features")
        {
            return FeatureProfile.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "profile-scalespace")
        {
            return ScaleSpaceProfile.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "profile-matching")
        {
            return MatchingProfile.Run(args[1..]);
        }
        if (args.Length > 0 && args[0] == "eval-refiner")
        {
            return RefinerEval.Run(args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 3,
                args.Length > 2 ? double.Parse(args[2], CultureInfo.InvariantCulture) : new Seamwright.Core.Estimation.ConsensusRefinerOptions().CandidateRadiusThresholds);
        }
        BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
        return 0;
    }
}
