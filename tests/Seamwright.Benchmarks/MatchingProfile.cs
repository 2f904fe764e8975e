using Seamwright.Core.Matching;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Loading;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>`profile-matching [repeats]`: thread CPU time of matching per homogr pair (median per pair, mean over pairs) and a hash of the matches.</summary>
internal static class MatchingProfile
{
    public static int Run(string[] args)
    {
        var set = HomogrSet.TryLoad();
        if (set is null)
        {
            return 1;
        }
        int repeats = args.Length > 0 ? int.Parse(args[0], System.Globalization.CultureInfo.InvariantCulture) : 3;
        var loader = new ImageLoader();
        double total = 0;
        ulong hash = 14695981039346656037UL;
        foreach (var pair in set)
        {
            var fa = ImageFeatureExtractor.Extract(loader.Load(pair.ImageA).Image, null, FeatureSettings.Default);
            var fb = ImageFeatureExtractor.Extract(loader.Load(pair.ImageB).Image, null, FeatureSettings.Default);
            var times = new List<double>();
            MatchResult? result = null;
            for (int r = 0; r < repeats; r++)
            {
                double c = ThreadCpuClock.NowMilliseconds();
                result = HammingMatcher.Match(fa.Descriptors, fb.Descriptors, fa.Keypoints, fb.Keypoints, new MatchOptions());
                times.Add(ThreadCpuClock.NowMilliseconds() - c);
            }
            total += times.Order().ElementAt(times.Count / 2);
            foreach (var m in result!.Matches)
            {
                hash = (hash ^ (ulong)(uint)m.IndexA) * 1099511628211UL;
                hash = (hash ^ (ulong)(uint)m.IndexB) * 1099511628211UL;
                hash = (hash ^ (ulong)(uint)m.Distance) * 1099511628211UL;
                hash = (hash ^ (ulong)(uint)m.SecondDistance) * 1099511628211UL;
            }
            hash = (hash ^ (ulong)(uint)result.AmbiguousCount) * 1099511628211UL;
        }
        Console.WriteLine(System.FormattableString.Invariant($"matching: {total / set.Count:F2} ms CPU per pair (mean over 16), hash {hash:X16}"));
        return 0;
    }
}
