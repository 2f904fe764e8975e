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
        BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
        return 0;
    }
}
