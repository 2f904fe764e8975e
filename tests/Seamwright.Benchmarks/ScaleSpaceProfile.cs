using System.Globalization;
using System.Runtime.InteropServices;
using Seamwright.Core.Features.ScaleSpace;
using Seamwright.Core.Imaging;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Loading;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// `profile-scalespace [repeats] [--views]`: thread CPU time of the scale-space detector on the compact copies
/// of the Oxford images (as the pair flow's second look sees them), split into the octaves (blurs and
/// differences), the extremum search and the rest (ordering, directions, descriptors); with --views also
/// the tilted views of the first image (all threads: process CPU). Prints an FNV-1a hash of every
/// detected keypoint and descriptor so that a speed change that must leave results alone can be checked.
/// The split re-runs the octaves and the search outside the detector with Lowe's contrast floor only, so
/// its parts are estimates; the total is the detector itself.
/// </summary>
internal static class ScaleSpaceProfile
{
    public static int Run(string[] args)
    {
        var set = OxfordSet.TryLoad();
        if (set is null)
        {
            Console.Error.WriteLine("Oxford set not found at " + OxfordSet.Folder);
            return 1;
        }
        int repeats = args.Length > 0 && int.TryParse(args[0], NumberStyles.Integer, CultureInfo.InvariantCulture, out int n) ? n : 3;
        bool views = args.Contains("--views");
        var loader = new ImageLoader();
        var files = set.Select(p => p.ImageA).Concat(set.Select(p => p.ImageB)).Distinct().Order(StringComparer.Ordinal).ToArray();
        var options = new ScaleSpaceOptions();
        var compacts = files.Select(f => ImageFeatureExtractor.Extract(loader.Load(f).Image, null, FeatureSettings.Default).Compact!.Image).ToArray();
        ScaleSpaceDetector.Detect(compacts[0], options); // warm-up
        double total = 0, octaves = 0, extrema = 0;
        ulong hash = 14695981039346656037UL;
        int count = 0;
        foreach (var image in compacts)
        {
            var t = new List<double>();
            var o = new List<double>();
            var e = new List<double>();
            ScaleSpaceFeatureSet? result = null;
            for (int r = 0; r < repeats; r++)
            {
                double c0 = ThreadCpuClock.NowMilliseconds();
                result = ScaleSpaceDetector.Detect(image, options);
                t.Add(ThreadCpuClock.NowMilliseconds() - c0);
                var (oct, ext) = Split(image, options);
                o.Add(oct);
                e.Add(ext);
            }
            total += Median(t);
            octaves += Median(o);
            extrema += Median(e);
            count += result!.Count;
            hash = Fnv(hash, MemoryMarshal.AsBytes(result.Keypoints.AsSpan()));
            hash = Fnv(hash, result.Descriptors);
        }
        var inv = CultureInfo.InvariantCulture;
        int k = compacts.Length;
        Console.WriteLine(string.Create(inv, $"{k} Oxford compact copies ({compacts[0].Width} x {compacts[0].Height} first), {repeats} runs each, thread CPU ms per image (median per image, mean over images), load average {PairComparisonReport.LoadAverage()}"));
        Console.WriteLine(string.Create(inv, $"detector total {total / k:F1}: octaves ~{octaves / k:F1}, extremum search ~{extrema / k:F1}, rest (order, directions, descriptors) ~{(total - octaves - extrema) / k:F1}"));
        Console.WriteLine(string.Create(inv, $"{count} features, hash {hash:x16}"));
        if (views)
        {
            var c0 = System.Diagnostics.Process.GetCurrentProcess().TotalProcessorTime;
            var w0 = System.Diagnostics.Stopwatch.GetTimestamp();
            var pooled = AffineViewDetector.Detect(compacts[0], options, 3, 1000);
            double cpu = (System.Diagnostics.Process.GetCurrentProcess().TotalProcessorTime - c0).TotalMilliseconds;
            Console.WriteLine(string.Create(inv, $"tilted views of image 1: {pooled.Count} features, process CPU {cpu:F0} ms, wall {System.Diagnostics.Stopwatch.GetElapsedTime(w0).TotalMilliseconds:F0} ms, hash {Fnv(Fnv(14695981039346656037UL, MemoryMarshal.AsBytes(pooled.Keypoints.AsSpan())), pooled.Descriptors):x16}"));
            // The affine-view path matches such a pool against the other image's plain features: time that on its own, both dot-product paths.
            var plain = ScaleSpaceDetector.Detect(compacts[1], options);
            foreach (var path in new[] { Core.Matching.HistogramDots.Path.Best, Core.Matching.HistogramDots.Path.Scalar })
            {
                double m0 = ThreadCpuClock.NowMilliseconds();
                var matched = Core.Matching.HistogramMatcher.Match(pooled, plain, new Core.Matching.MatchOptions(), path);
                Console.WriteLine(string.Create(inv, $"matching the pool against image 2's {plain.Count} features ({path}): {matched.Matches.Length} matches, thread CPU {ThreadCpuClock.NowMilliseconds() - m0:F0} ms"));
            }
        }
        return 0;
    }

    /// <summary>Thread CPU of building the octaves and of searching them (the detector's own steps, re-run).</summary>
    private static (double Octaves, double Extrema) Split(GrayImage image, ScaleSpaceOptions options)
    {
        double octaves = 0, extrema = 0;
        double c0 = ThreadCpuClock.NowMilliseconds();
        var plane = new FloatPlane(image.Width, image.Height);
        for (int i = 0; i < plane.Data.Length; i++)
        {
            plane.Data[i] = image.Pixels[i] / 255f;
        }
        var current = (4L * image.Width * image.Height <= options.PixelBudget ? plane.DoubleSize() : plane).Blurred(1.25);
        octaves += ThreadCpuClock.NowMilliseconds() - c0;
        var contrasts = Enumerable.Repeat(options.ContrastThreshold / options.IntervalsPerOctave, options.IntervalsPerOctave + 2).ToArray();
        for (int o = 0; Math.Min(current.Width, current.Height) >= 24; o++)
        {
            double c1 = ThreadCpuClock.NowMilliseconds();
            var octave = GaussianOctave.Create(current, o, options);
            double c2 = ThreadCpuClock.NowMilliseconds();
            ExtremumLocator.Find(octave, contrasts, options.EdgeRatio);
            double c3 = ThreadCpuClock.NowMilliseconds();
            current = octave.NextBase();
            octaves += c2 - c1 + ThreadCpuClock.NowMilliseconds() - c3;
            extrema += c3 - c2;
        }
        return (octaves, extrema);
    }

    private static double Median(List<double> v) => v.Order().ElementAt(v.Count / 2);

    private static ulong Fnv(ulong hash, ReadOnlySpan<byte> bytes)
    {
        foreach (byte b in bytes)
        {
            hash = (hash ^ b) * 1099511628211UL;
        }
        return hash;
    }
}
