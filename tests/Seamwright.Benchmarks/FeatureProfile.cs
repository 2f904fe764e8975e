using System.Globalization;
using System.Runtime.InteropServices;
using Seamwright.Core.Features;
using Seamwright.Core.Imaging;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Loading;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks;

/// <summary>
/// `dotnet run -c Release --project tests/Seamwright.Benchmarks -- profile-features [repeats]`:
/// thread CPU time of each step of feature extraction on the 32 homogr images (median over
/// repeats per image, then summed per step and divided by the image count), plus an FNV-1a hash
/// of every extracted feature (keypoints, descriptors, stored patches) so that speed changes
/// that must not change results can be checked bit for bit.
/// </summary>
internal static class FeatureProfile
{
    private static readonly string[] Steps =
        ["load", "budget", "noise", "pyramid", "response", "nms", "pick", "smooth", "orient", "descriptor", "extract"];

    public static int Run(string[] args)
    {
        var set = HomogrSet.TryLoad();
        if (set is null)
        {
            Console.Error.WriteLine("homogr set not found at " + RepoPaths.HomogrFolder);
            return 1;
        }
        int repeats = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 3;
        var loader = new ImageLoader();
        var files = set.SelectMany(p => new[] { p.ImageA, p.ImageB }).ToArray();
        var settings = FeatureSettings.Default;
        // Warm-up (JIT, noise simulation cache).
        Steps1(loader, files[0], settings);
        var totals = Steps.ToDictionary(s => s, _ => 0.0);
        ulong hash = 14695981039346656037UL;
        int features = 0;
        foreach (string file in files)
        {
            var runs = new List<Dictionary<string, double>>();
            for (int r = 0; r < repeats; r++)
            {
                runs.Add(Steps1(loader, file, settings));
            }
            foreach (string s in Steps)
            {
                totals[s] += runs.Select(d => d[s]).Order().ElementAt(runs.Count / 2);
            }
            var f = ImageFeatureExtractor.Extract(loader.Load(file).Image, null, settings);
            features += f.Count;
            hash = Fnv(hash, MemoryMarshal.AsBytes(f.Keypoints.AsSpan()));
            hash = Fnv(hash, MemoryMarshal.AsBytes(f.Descriptors.AsSpan()));
            hash = Fnv(hash, f.Patches);
        }
        var inv = CultureInfo.InvariantCulture;
        Console.WriteLine(string.Create(inv, $"{files.Length} homogr images, {repeats} runs each, thread CPU ms per image (median per image, mean over images)"));
        foreach (string s in Steps)
        {
            Console.WriteLine(string.Create(inv, $"  {s,-11} {totals[s] / files.Length,8:F2}"));
        }
        Console.WriteLine(string.Create(inv, $"features {features}, candidates per run {Candidates / (repeats * files.Length + 1)}, hash {hash:X16}"));
        return 0;
    }

    /// <summary>One extraction, step by step, mirroring ImageFeatureExtractor and OrientedCornerExtractor.</summary>
    private static Dictionary<string, double> Steps1(ImageLoader loader, string file, FeatureSettings settings)
    {
        var t = Steps.ToDictionary(s => s, _ => 0.0);
        double c = ThreadCpuClock.NowMilliseconds();
        var full = loader.Load(file).Image;
        t["load"] = Lap(ref c);
        var scaled = AreaResampler.ToPixelBudget(full, settings.AnalysisPixelBudget);
        t["budget"] = Lap(ref c);
        var options = settings.Detector;
        var image = scaled.Image;
        double sigma = NoiseLevel.Estimate(image.Pixels, image.Width, image.Height);
        var noise = NoiseResponse.PerUnitVariance(options);
        t["noise"] = Lap(ref c);
        var budgets = OrientedCornerExtractor.LevelBudgets(options);
        int border = BinaryDescriptor.Reach + 2;
        var level = image;
        var count = 0;
        for (int k = 0; k < options.Levels; k++)
        {
            if (k > 0)
            {
                int nw = AreaResampler.OutputLength(level.Width, options.ScaleFactor);
                int nh = AreaResampler.OutputLength(level.Height, options.ScaleFactor);
                if (nw <= 2 * border + 8 || nh <= 2 * border + 8)
                {
                    break;
                }
                level = AreaResampler.Downscale(level, options.ScaleFactor).Image;
                t["pyramid"] += Lap(ref c);
            }
            int w = level.Width, h = level.Height;
            var resp = new float[w * h];
            CornerResponse.Compute(level.Pixels, w, h, options.BlockSize, 0, Span<float>.Empty, resp);
            double response = Lap(ref c);
            t["response"] += response;
            var found = new List<LevelCorner>();
            CornerDetector.Collect(resp, w, h, ReadOnlySpan<byte>.Empty, border, Floor(options, noise, k, sigma), found);
            t["nms"] += Lap(ref c);
            Candidates += found.Count;
            var corners = CornerDetector.SpreadPick(found, w, h, budgets[k], options.CellSize);
            t["pick"] += Lap(ref c);
            var smoothed = GaussianSmoother.Smooth(level.Pixels, w, h, DescriptorPattern.SmoothingSigma,
                DescriptorPattern.SmoothingRadius);
            t["smooth"] += Lap(ref c);
            var angles = new float[corners.Count];
            for (int i = 0; i < corners.Count; i++)
            {
                angles[i] = IntensityCentroid.Angle(level.Pixels, w, (int)MathF.Round(corners[i].X), (int)MathF.Round(corners[i].Y));
            }
            t["orient"] += Lap(ref c);
            for (int i = 0; i < corners.Count; i++)
            {
                BinaryDescriptor.Compute(smoothed, w, (int)MathF.Round(corners[i].X), (int)MathF.Round(corners[i].Y), angles[i]);
            }
            t["descriptor"] += Lap(ref c);
            count += corners.Count;
        }
        var f = ImageFeatureExtractor.Extract(full, null, settings);
        t["extract"] = Lap(ref c);
        return t;
    }

    private static long Candidates;

    private static float Floor(CornerDetectorOptions options, double[] perUnit, int level, double sigma)
    {
        double floorSigma = options.MinNoiseSigma;
        double variance = level == 0
            ? perUnit[0] * Math.Max(sigma, floorSigma) * Math.Max(sigma, floorSigma)
            : perUnit[level] * sigma * sigma + perUnit[0] * floorSigma * floorSigma;
        return (float)(options.NoiseFactor * variance);
    }

    private static double Lap(ref double clock)
    {
        double now = ThreadCpuClock.NowMilliseconds();
        double d = now - clock;
        clock = now;
        return d;
    }

    private static ulong Fnv(ulong hash, ReadOnlySpan<byte> bytes)
    {
        foreach (byte b in bytes)
        {
            hash = (hash ^ b) * 1099511628211UL;
        }
        return hash;
    }
}
