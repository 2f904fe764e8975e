using System.Diagnostics;
using OpenCvSharp;
using Seamwright.Core.Imaging;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Loading;
using Seamwright.Pipeline.Pairs;
using Seamwright.Tests.Shared;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Benchmarks;

/// <summary>Stage times of one run of a pair pipeline, milliseconds, and the validation error of its result.</summary>
internal sealed record PairRun(string Pipeline, string Pair, double ErrorPx, IReadOnlyDictionary<string, double> StagesMs, double TotalMs);

/// <summary>The two pipelines compared on one pair, decoding included, one thread each.</summary>
internal static class PairPipelines
{
    private static readonly ImageLoader Loader = new();

    public static PairRun Seamwright(HomogrPair pair)
    {
        long t0 = Stopwatch.GetTimestamp();
        var imageA = Loader.Load(pair.ImageA).Image;
        var imageB = Loader.Load(pair.ImageB).Image;
        double load = Ms(t0);
        long t1 = Stopwatch.GetTimestamp();
        var fa = ImageFeatureExtractor.Extract(imageA, null, FeatureSettings.Default);
        var fb = ImageFeatureExtractor.Extract(imageB, null, FeatureSettings.Default);
        double features = Ms(t1);
        var outcome = PairProcessor.Process(fa, fb, PairSettings.Default);
        double total = Ms(t0);
        var t = outcome.TimingsMs;
        var stages = new Dictionary<string, double>
        {
            ["load"] = load, ["features"] = features, ["matching"] = t.Matching, ["sampling"] = t.Sampling,
            ["refinement"] = t.Refinement, ["relocalization"] = t.Relocalization, ["polish"] = t.Polish,
        };
        double error = outcome.Estimate.Transform is { } h ? pair.ValidationError(h) : double.PositiveInfinity;
        return new PairRun("seamwright", pair.Name, error, stages, total);
    }

    /// <summary>General-purpose reference (OpenCV via OpenCvSharp4): ORB 4000, brute-force Hamming k=2, ratio 0.8, USAC_MAGSAC 3 px.</summary>
    public static PairRun OpenCvOrb(HomogrPair pair)
    {
        long t0 = Stopwatch.GetTimestamp();
        using var a = Cv2.ImRead(pair.ImageA, ImreadModes.Grayscale);
        using var b = Cv2.ImRead(pair.ImageB, ImreadModes.Grayscale);
        double load = Ms(t0);
        long t1 = Stopwatch.GetTimestamp();
        using var orb = ORB.Create(4000);
        using var da = new Mat();
        using var db = new Mat();
        orb.DetectAndCompute(a, null, out var ka, da);
        orb.DetectAndCompute(b, null, out var kb, db);
        double features = Ms(t1);
        long t2 = Stopwatch.GetTimestamp();
        using var matcher = new BFMatcher(NormTypes.Hamming);
        var knn = matcher.KnnMatch(da, db, 2);
        var src = new List<Point2d>();
        var dst = new List<Point2d>();
        foreach (var m in knn)
        {
            if (m.Length == 2 && m[0].Distance < 0.8 * m[1].Distance)
            {
                src.Add(new Point2d(ka[m[0].QueryIdx].Pt.X, ka[m[0].QueryIdx].Pt.Y));
                dst.Add(new Point2d(kb[m[0].TrainIdx].Pt.X, kb[m[0].TrainIdx].Pt.Y));
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
                error = pair.ValidationError(t);
            }
        }
        double estimate = Ms(t3);
        var stages = new Dictionary<string, double>
        {
            ["load"] = load, ["features"] = features, ["matching"] = matching, ["estimate"] = estimate,
        };
        return new PairRun("opencv-orb", pair.Name, error, stages, Ms(t0));
    }

    internal static GrayImage LoadGray(string path)
    {
        using var image = Image.Load<L8>(path);
        var gray = new GrayImage(image.Width, image.Height);
        image.CopyPixelDataTo(gray.Pixels);
        return gray;
    }

    private static double Ms(long start) => Stopwatch.GetElapsedTime(start).TotalMilliseconds;
}
