using System.Diagnostics;
using OpenCvSharp;
using Seamwright.Core.Estimation;
using Seamwright.Core.Imaging;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Loading;
using Seamwright.Pipeline.Pairs;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Benchmarks;

/// <summary>
/// Stage times of one run of a pair pipeline (wall, milliseconds), the CPU time of the whole process
/// over the run (every thread: the tilted views are detected in parallel), the validation error of
/// its result (infinite when rejected or without a transform) and, for ours, which feature path decided.
/// </summary>
internal sealed record PairRun(string Pipeline, string Pair, double ErrorPx, IReadOnlyDictionary<string, double> StagesMs, double TotalMs,
    double CpuMs, string Path);

/// <summary>The pipelines compared on one pair, decoding included, one thread each (ours uses more only for the tilted views).</summary>
internal static class PairPipelines
{
    private static readonly ImageLoader Loader = new();

    /// <summary>Our `pair` flow as the `pair` command runs it (second look and tilted views included where they run), features one image after the other.</summary>
    public static PairRun Seamwright(BenchmarkPair pair) => Seamwright(pair, parallelFeatures: false);

    /// <summary>
    /// Our flow; with <paramref name="parallelFeatures"/> the two images' features are extracted side by side
    /// exactly as the `pair` command does (the warm counterpart of a fresh `pair` process).
    /// </summary>
    public static PairRun Seamwright(BenchmarkPair pair, bool parallelFeatures)
    {
        var cpu0 = ProcessCpu();
        long t0 = Stopwatch.GetTimestamp();
        var imageA = Loader.Load(pair.ImageA).Image;
        var imageB = Loader.Load(pair.ImageB).Image;
        double load = Ms(t0);
        long t1 = Stopwatch.GetTimestamp();
        ImageFeatures fa, fb;
        if (parallelFeatures)
        {
            var taskA = Task.Run(() => ImageFeatureExtractor.Extract(imageA, null, FeatureSettings.Default));
            fb = ImageFeatureExtractor.Extract(imageB, null, FeatureSettings.Default);
            fa = taskA.GetAwaiter().GetResult();
        }
        else
        {
            fa = ImageFeatureExtractor.Extract(imageA, null, FeatureSettings.Default);
            fb = ImageFeatureExtractor.Extract(imageB, null, FeatureSettings.Default);
        }
        double features = Ms(t1);
        long t2 = Stopwatch.GetTimestamp();
        var outcome = PairProcessor.Process(fa, fb, PairSettings.Default);
        double process = Ms(t2);
        double total = Ms(t0);
        double cpu = (ProcessCpu() - cpu0).TotalMilliseconds;
        var t = outcome.TimingsMs;
        var e = outcome.Estimate;
        var stages = new Dictionary<string, double>
        {
            ["load"] = load, ["features"] = features, ["matching"] = t.Matching, ["sampling"] = t.Sampling,
            ["refinement"] = t.Refinement, ["relocalization"] = t.Relocalization, ["polish"] = t.Polish,
            // Everything of the pair flow after the two images' corner features: corner path and, where it runs, the second look.
            ["pair flow"] = process,
        };
        double error = e.Transform is { } h && e.Status != PairStatus.Rejected
            ? pair.Score(h, imageA.Width, imageA.Height, imageB.Width, imageB.Height)
            : double.PositiveInfinity;
        return new PairRun("seamwright", pair.Name, error, stages, total, cpu, e.Status == PairStatus.Rejected ? "rejected" : e.FeaturePath.Word());
    }

    /// <summary>General-purpose reference (OpenCV via OpenCvSharp4): ORB 4000, brute-force Hamming k=2, ratio 0.8, USAC_MAGSAC 3 px.</summary>
    public static PairRun OpenCvOrb(BenchmarkPair pair)
    {
        using var orb = ORB.Create(4000);
        return OpenCv(pair, "opencv-orb", orb, NormTypes.Hamming);
    }

    /// <summary>General-purpose reference (OpenCV via OpenCvSharp4): SIFT with its default settings, brute-force L2 k=2, ratio 0.8, USAC_MAGSAC 3 px.</summary>
    public static PairRun OpenCvSift(BenchmarkPair pair)
    {
        using var sift = OpenCvSharp.Features2D.SIFT.Create();
        return OpenCv(pair, "opencv-sift", sift, NormTypes.L2);
    }

    private static PairRun OpenCv(BenchmarkPair pair, string name, Feature2D detector, NormTypes norm)
    {
        var cpu0 = ProcessCpu();
        long t0 = Stopwatch.GetTimestamp();
        using var a = Cv2.ImRead(pair.ImageA, ImreadModes.Grayscale);
        using var b = Cv2.ImRead(pair.ImageB, ImreadModes.Grayscale);
        double load = Ms(t0);
        long t1 = Stopwatch.GetTimestamp();
        using var da = new Mat();
        using var db = new Mat();
        detector.DetectAndCompute(a, null, out var ka, da);
        detector.DetectAndCompute(b, null, out var kb, db);
        double features = Ms(t1);
        long t2 = Stopwatch.GetTimestamp();
        var src = new List<Point2d>();
        var dst = new List<Point2d>();
        if (ka.Length >= 2 && kb.Length >= 2)
        {
            using var matcher = new BFMatcher(norm);
            var knn = matcher.KnnMatch(da, db, 2);
            foreach (var m in knn)
            {
                if (m.Length == 2 && m[0].Distance < 0.8 * m[1].Distance)
                {
                    src.Add(new Point2d(ka[m[0].QueryIdx].Pt.X, ka[m[0].QueryIdx].Pt.Y));
                    dst.Add(new Point2d(kb[m[0].TrainIdx].Pt.X, kb[m[0].TrainIdx].Pt.Y));
                }
            }
        }
        double matching = Ms(t2);
        long t3 = Stopwatch.GetTimestamp();
        double error = double.PositiveInfinity;
        if (src.Count >= 4)
        {
            using var h = Cv2.FindHomography(src, dst, HomographyMethods.USAC_MAGSAC, 3);
            if (!h.Empty())
            {
                var t = new Core.Geometry.Transform2D(
                    h.At<double>(0, 0), h.At<double>(0, 1), h.At<double>(0, 2),
                    h.At<double>(1, 0), h.At<double>(1, 1), h.At<double>(1, 2),
                    h.At<double>(2, 0), h.At<double>(2, 1), h.At<double>(2, 2));
                error = pair.Score(t, a.Width, a.Height, b.Width, b.Height);
            }
        }
        double estimate = Ms(t3);
        var stages = new Dictionary<string, double>
        {
            ["load"] = load, ["features"] = features, ["matching"] = matching, ["estimate"] = estimate,
        };
        return new PairRun(name, pair.Name, error, stages, Ms(t0), (ProcessCpu() - cpu0).TotalMilliseconds, "");
    }

    internal static GrayImage LoadGray(string path)
    {
        using var image = Image.Load<L8>(path);
        var gray = new GrayImage(image.Width, image.Height);
        image.CopyPixelDataTo(gray.Pixels);
        return gray;
    }

    private static TimeSpan ProcessCpu()
    {
        using var p = Process.GetCurrentProcess();
        return p.TotalProcessorTime;
    }

    private static double Ms(long start) => Stopwatch.GetElapsedTime(start).TotalMilliseconds;
}
