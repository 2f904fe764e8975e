using Seamwright.Core.Geometry;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// One scored pair of the `pairs` table: its set, the two image files and the set's own score of an
/// A-to-B transform (homogr: mean transfer error over the annotated validation pairs; Oxford: the set
/// README's 10 x 10 grid error), given the two images' sizes.
/// </summary>
internal sealed record BenchmarkPair(string Set, string Name, string ImageA, string ImageB, Func<Transform2D, int, int, int, int, double> Score)
{
    public static IReadOnlyList<BenchmarkPair> Homogr(IReadOnlyList<HomogrPair> set) =>
        [.. set.Select(p => new BenchmarkPair("homogr", p.Name, p.ImageA, p.ImageB, (h, _, _, _, _) => p.ValidationError(h)))];

    public static IReadOnlyList<BenchmarkPair> Oxford(IReadOnlyList<OxfordPair> set) =>
        [.. set.Select(p => new BenchmarkPair("oxford", p.Name, p.ImageA, p.ImageB, p.GridError))];
}
