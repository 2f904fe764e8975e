using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Quality;
using Seamwright.Pipeline.Matches;

namespace Seamwright.Host.Commands;

/// <summary>
/// <c>seamwright estimate FILE [--model M] [--threshold PX] [--seed N] [--no-refine] [--size-a WxH]
/// [--size-b WxH] [--json]</c>: one pairwise estimate from a match file. Exit 0 whenever the file
/// was valid (also for rejected results); 2 with a one-line message for bad input or arguments.
/// </summary>
internal static class EstimateCommand
{
    public const string UsageLine =
        "estimate FILE [--model homography|affine|similarity|translation] [--threshold PX] [--seed N] [--no-refine] [--size-a WxH] [--size-b WxH] [--json]";

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
            stderr.WriteLine($"seamwright estimate: {error} (usage: seamwright {UsageLine})");
            return ExitCodes.BadArguments;
        }
        MatchFile file;
        try
        {
            file = MatchFileReader.Read(request.File);
        }
        catch (MatchFileException ex)
        {
            stderr.WriteLine("seamwright estimate: " + ex.Message);
            return ExitCodes.BadArguments;
        }
        int minimal = MotionFamily.Of(request.Options.Model).MinimalSampleSize;
        if (file.Matches.Length < minimal)
        {
            string model = EstimateOutput.ModelName(request.Options.Model);
            stderr.WriteLine($"seamwright estimate: {request.File}: {file.Matches.Length} match{(file.Matches.Length == 1 ? "" : "es")}; a {model} needs at least {minimal}");
            return ExitCodes.BadArguments;
        }
        var sizeA = request.SizeA ?? file.BoundsA;
        var sizeB = request.SizeB ?? file.BoundsB;
        var estimate = PairEstimator.Estimate(file.Matches, sizeA, sizeB, request.Options);
        if (request.Json)
        {
            stdout.WriteLine(EstimateOutput.ToJson(estimate, sizeA, sizeB));
        }
        else
        {
            EstimateOutput.WriteSummary(stdout, estimate, sizeA, sizeB);
        }
        return ExitCodes.Ok;
    }

    internal sealed record Request(string File, EstimationOptions Options, ImageSize? SizeA, ImageSize? SizeB, bool Json);

    internal static bool TryParse(string[] args, out Request request, out string? error)
    {
        request = null!;
        error = null;
        string? file = null;
        var options = EstimationOptions.Default;
        ImageSize? sizeA = null, sizeB = null;
        bool json = false;
        for (int i = 0; i < args.Length; i++)
        {
            string a = args[i];
            string? Value()
            {
                if (i + 1 >= args.Length)
                {
                    return null;
                }
                return args[++i];
            }
            switch (a)
            {
                case "--json":
                    json = true;
                    break;
                case "--no-refine":
                    options = options with { Refine = false };
                    break;
                case "--model":
                case "--threshold":
                case "--seed":
                    error = EstimationArguments.Apply(a, Value(), "pixels", ref options);
                    if (error is not null)
                    {
                        return false;
                    }
                    break;
                case "--size-a":
                case "--size-b":
                    string? z = Value();
                    if (!TryParseSize(z, out var size))
                    {
                        error = $"{a} expects WIDTHxHEIGHT in pixels, e.g. 4000x3000 (got '{z}')";
                        return false;
                    }
                    if (a == "--size-a")
                    {
                        sizeA = size;
                    }
                    else
                    {
                        sizeB = size;
                    }
                    break;
                default:
                    if (a.StartsWith('-') && a.Length > 1)
                    {
                        error = $"unknown option '{a}'";
                        return false;
                    }
                    if (file is not null)
                    {
                        error = $"one match file expected, got '{file}' and '{a}'";
                        return false;
                    }
                    file = a;
                    break;
            }
        }
        if (file is null)
        {
            error = "missing the match FILE";
            return false;
        }
        request = new Request(file, options, sizeA, sizeB, json);
        return true;
    }

    private static bool TryParseSize(string? text, out ImageSize size)
    {
        size = default;
        var parts = text?.Split('x', 'X');
        if (parts is not { Length: 2 } ||
            !int.TryParse(parts[0], NumberStyles.None, CultureInfo.InvariantCulture, out int w) ||
            !int.TryParse(parts[1], NumberStyles.None, CultureInfo.InvariantCulture, out int h) || w <= 0 || h <= 0)
        {
            return false;
        }
        size = new ImageSize(w, h);
        return true;
    }
}
