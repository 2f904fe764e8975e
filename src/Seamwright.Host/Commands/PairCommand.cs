using System.Diagnostics;
using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Loading;
using Seamwright.Pipeline.Pairs;

namespace Seamwright.Host.Commands;

/// <summary>
/// <c>seamwright pair IMAGE_A IMAGE_B [--model M] [--threshold PX] [--seed N] [--mask-a FILE]
/// [--mask-b FILE] [--json]</c>: one pair from two image files. Exit 0 whenever both images
/// loaded (also for a rejected pair); 2 with a one-line reason naming the file for bad input.
/// </summary>
internal static class PairCommand
{
    public const string UsageLine =
        "pair IMAGE_A IMAGE_B [--model homography|affine|similarity|translation] [--threshold PX] [--seed N] [--mask-a FILE] [--mask-b FILE] [--json]";

    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
    {
        ArgumentNullException.ThrowIfNull(args);
        ArgumentNullException.ThrowIfNull(stdout);
        ArgumentNullException.ThrowIfNull(stderr);
        if (args.Length == 1 && args[0] is "-h" or "--help")
        {
            stdout.WriteLine("usage: seamwright " + UsageLine);
            return ExitCodes.Ok;
        }
        if (!TryParse(args, out var request, out string? error))
        {
            stderr.WriteLine($"seamwright pair: {error} (usage: seamwright {UsageLine})");
            return ExitCodes.BadArguments;
        }
        long start = Stopwatch.GetTimestamp();
        var loader = new ImageLoader();
        LoadedImage imageA, imageB;
        FeatureMask? maskA, maskB;
        try
        {
            maskA = request.MaskA is null ? null : ReadMask(loader, request.MaskA);
            maskB = request.MaskB is null ? null : ReadMask(loader, request.MaskB);
            imageA = loader.Load(request.ImageA);
            imageB = loader.Load(request.ImageB);
        }
        catch (ImageLoadException ex)
        {
            stderr.WriteLine("seamwright pair: " + ex.Message);
            return ExitCodes.BadArguments;
        }
        catch (MaskFileException ex)
        {
            stderr.WriteLine("seamwright pair: " + ex.Message);
            return ExitCodes.BadArguments;
        }
        double loadMs = Stopwatch.GetElapsedTime(start).TotalMilliseconds;

        long featureStart = Stopwatch.GetTimestamp();
        // Parallel across the two images (never inside one estimate): the result does not depend on the schedule.
        var settings = FeatureSettings.Default;
        var taskA = Task.Run(() => ImageFeatureExtractor.Extract(imageA.Image, maskA, settings));
        var featuresB = ImageFeatureExtractor.Extract(imageB.Image, maskB, settings);
        var featuresA = taskA.GetAwaiter().GetResult();
        double featuresMs = Stopwatch.GetElapsedTime(featureStart).TotalMilliseconds;

        var outcome = PairProcessor.Process(featuresA, featuresB, request.Settings);
        double totalMs = Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        var timings = new PairCommandTimings(loadMs, featuresMs, totalMs);
        if (request.Json)
        {
            stdout.WriteLine(PairOutput.ToJson(outcome, featuresA, featuresB, timings));
        }
        else
        {
            PairOutput.WriteSummary(stdout, request.ImageA, request.ImageB, outcome, featuresA, featuresB, timings);
        }
        return ExitCodes.Ok;
    }

    internal sealed record Request(string ImageA, string ImageB, PairSettings Settings, string? MaskA, string? MaskB, bool Json);

    internal static bool TryParse(string[] args, out Request request, out string? error)
    {
        request = null!;
        error = null;
        var files = new List<string>();
        var options = EstimationOptions.Default;
        string? maskA = null, maskB = null;
        bool json = false;
        for (int i = 0; i < args.Length; i++)
        {
            string a = args[i];
            string? value = a is "--model" or "--threshold" or "--seed" or "--mask-a" or "--mask-b"
                ? (i + 1 < args.Length ? args[++i] : null)
                : null;
            switch (a)
            {
                case "--json":
                    json = true;
                    break;
                case "--model":
                case "--threshold":
                case "--seed":
                    error = EstimationArguments.Apply(a, value, "full-resolution pixels", ref options);
                    if (error is not null)
                    {
                        return false;
                    }
                    break;
                case "--mask-a":
                case "--mask-b":
                    if (string.IsNullOrEmpty(value))
                    {
                        error = $"{a} expects a FILE (a mask image, or a .txt of 'x y width height' rectangles)";
                        return false;
                    }
                    if (a == "--mask-a")
                    {
                        maskA = value;
                    }
                    else
                    {
                        maskB = value;
                    }
                    break;
                default:
                    if (a.StartsWith('-') && a.Length > 1)
                    {
                        error = $"unknown option '{a}'";
                        return false;
                    }
                    files.Add(a);
                    break;
            }
        }
        if (files.Count != 2)
        {
            error = $"two image files expected, got {files.Count}";
            return false;
        }
        request = new Request(files[0], files[1], PairSettings.Default with { Estimation = options }, maskA, maskB, json);
        return true;
    }

    /// <summary>A mask: a .txt file of rectangles, otherwise an image (dark pixels excluded).</summary>
    private static FeatureMask ReadMask(ImageLoader loader, string path)
    {
        if (path.EndsWith(".txt", StringComparison.OrdinalIgnoreCase))
        {
            string text;
            try
            {
                text = File.ReadAllText(path);
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
            {
                throw new MaskFileException($"{path}: cannot read the mask ({ex.Message})", ex);
            }
            try
            {
                return FeatureMask.ParseRectangles(text);
            }
            catch (FormatException ex)
            {
                throw new MaskFileException($"{path}: {ex.Message}", ex);
            }
        }
        return new FeatureMask([], loader.Load(path).Image);
    }

    private sealed class MaskFileException(string message, Exception inner) : Exception(message, inner);
}

/// <summary>In-process milliseconds measured by the command around the pair processing.</summary>
internal sealed record PairCommandTimings(double Load, double Features, double Total);
