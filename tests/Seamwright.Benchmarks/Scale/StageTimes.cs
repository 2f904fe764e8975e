using System.Globalization;
using System.Text.Json;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// Time per stage of one set run, read from the run's own log (compact JSON lines with
/// timestamps): images (hash, decode, features or feature cache), pairs (matching and
/// estimation, or the pair cache), and alignment plus outputs (joint refinement, preview,
/// report, sidecars, manifest).
/// </summary>
internal sealed record StageTimes(double ImagesS, double PairsS, double AlignAndOutputsS, int Images, int ImagesFromCache, int Pairs, int PairsEstimated)
{
    /// <summary>From the run's start to its outcome, s.</summary>
    public double TotalS { get; init; }

    /// <summary>Every set-model computation (overlap planning's forecasts and the final alignment), s; null when the log has no such line.</summary>
    public double? SetModelS { get; init; }

    /// <summary>Of <see cref="SetModelS"/>, overlap planning's forecasts, s.</summary>
    public double? PlanningS { get; init; }

    /// <summary>Preview and report, s.</summary>
    public double? VisualsS { get; init; }

    public static StageTimes? FromLogs(string outputRoot, DateTimeOffset since)
    {
        string logs = Path.Combine(outputRoot, ".seamwright", "logs");
        if (!Directory.Exists(logs))
        {
            return null;
        }
        DateTimeOffset? started = null, lastImage = null, planned = null, lastPair = null, finished = null;
        int images = 0, cached = 0, pairs = 0, estimated = -1;
        double? setModelMs = null, planningMs = null, visualsMs = null;
        foreach (string file in Directory.GetFiles(logs, "*.log").Order(StringComparer.Ordinal))
        {
            foreach (string line in ReadShared(file))
            {
                using var doc = JsonDocument.Parse(line);
                var root = doc.RootElement;
                var t = DateTimeOffset.Parse(root.GetProperty("@t").GetString()!, CultureInfo.InvariantCulture);
                if (t < since || !root.TryGetProperty("@mt", out var mtEl))
                {
                    continue;
                }
                string mt = mtEl.GetString() ?? "";
                if (mt.Contains("started with {Images} images", StringComparison.Ordinal))
                {
                    started ??= t;
                }
                else if (mt.Contains("analysed (from cache", StringComparison.Ordinal) || mt.Contains("bad file", StringComparison.Ordinal))
                {
                    lastImage = t;
                    images++;
                    if (root.TryGetProperty("FromCache", out var fc) && fc.ValueKind == JsonValueKind.True)
                    {
                        cached++;
                    }
                }
                else if (mt.Contains("pairs planned", StringComparison.Ordinal))
                {
                    planned = t;
                }
                else if (mt.Contains("pair {A} / {B}", StringComparison.Ordinal))
                {
                    lastPair = t;
                    pairs++;
                }
                else if (mt.Contains("pairs estimated", StringComparison.Ordinal) && root.TryGetProperty("Estimated", out var est))
                {
                    estimated = est.GetInt32();
                }
                else if (mt.Contains("set model and alignment {SetModelMs}", StringComparison.Ordinal))
                {
                    setModelMs = root.GetProperty("SetModelMs").GetDouble();
                    planningMs = root.GetProperty("PlanningMs").GetDouble();
                    visualsMs = root.GetProperty("VisualsMs").GetDouble();
                }
                else if (mt.Contains("{Outcome}", StringComparison.Ordinal) && mt.StartsWith("Set ", StringComparison.Ordinal))
                {
                    finished = t;
                }
            }
        }
        if (started is null || finished is null)
        {
            return null;
        }
        var imagesEnd = lastImage ?? started.Value;
        var pairsStart = planned ?? imagesEnd;
        var pairsEnd = lastPair ?? pairsStart;
        return new StageTimes((pairsStart - started.Value).TotalSeconds, (pairsEnd - pairsStart).TotalSeconds,
            (finished.Value - pairsEnd).TotalSeconds, images, cached, pairs, estimated)
        {
            TotalS = (finished.Value - started.Value).TotalSeconds,
            SetModelS = setModelMs / 1000, PlanningS = planningMs / 1000, VisualsS = visualsMs / 1000,
        };
    }

    private static IEnumerable<string> ReadShared(string path)
    {
        using var fs = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete);
        using var reader = new StreamReader(fs);
        while (reader.ReadLine() is { } line)
        {
            if (line.Length > 0)
            {
                yield return line;
            }
        }
    }
}
