using System.Globalization;
using System.Text;
using System.Text.Json;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;

namespace Seamwright.Host.Commands;

/// <summary>
/// The <c>pair</c> command's outputs: the fields of <c>estimate</c> (same order, same rules),
/// then the images, feature counts, matching figures, descriptor pattern version and timings.
/// Two runs differ only in <c>timingsMs</c>.
/// </summary>
internal static class PairOutput
{
    public static string ToJson(PairOutcome outcome, ImageFeatures a, ImageFeatures b, PairCommandTimings timings)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        ArgumentNullException.ThrowIfNull(timings);
        var e = outcome.Estimate;
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream))
        {
            w.WriteStartObject();
            EstimateOutput.WriteEstimateFields(w, e);
            EstimateOutput.Size(w, "sizeA", a.FullSize);
            EstimateOutput.Size(w, "sizeB", b.FullSize);
            EstimateOutput.Size(w, "imageA", a.FullSize);
            EstimateOutput.Size(w, "imageB", b.FullSize);
            w.WriteStartObject("workingScale");
            w.WritePropertyName("a");
            EstimateOutput.Number(w, a.WorkingScale);
            w.WritePropertyName("b");
            EstimateOutput.Number(w, b.WorkingScale);
            w.WriteEndObject();
            w.WriteStartObject("featureCount");
            w.WriteNumber("a", outcome.FeatureCountA);
            w.WriteNumber("b", outcome.FeatureCountB);
            w.WriteEndObject();
            w.WriteNumber("ambiguousCount", outcome.AmbiguousCount);
            w.WriteNumber("relocalizedCount", outcome.RelocalizedCount);
            w.WriteString("descriptorPattern", outcome.PatternVersion);
            w.WriteString("featureSettings", a.SettingsFingerprint);
            w.WriteStartArray("tiePoints");
            foreach (var t in outcome.TiePoints)
            {
                w.WriteStartArray();
                EstimateOutput.Number(w, t.X1);
                EstimateOutput.Number(w, t.Y1);
                EstimateOutput.Number(w, t.X2);
                EstimateOutput.Number(w, t.Y2);
                w.WriteEndArray();
            }
            w.WriteEndArray();
            var p = outcome.TimingsMs;
            w.WriteStartObject("timingsMs");
            EstimateOutput.Timing(w, "load", timings.Load);
            EstimateOutput.Timing(w, "features", timings.Features);
            EstimateOutput.Timing(w, "matching", p.Matching);
            EstimateOutput.Timing(w, "sampling", p.Sampling);
            EstimateOutput.Timing(w, "refinement", p.Refinement);
            EstimateOutput.Timing(w, "relocalization", p.Relocalization);
            EstimateOutput.Timing(w, "polish", p.Polish);
            EstimateOutput.Timing(w, "total", timings.Total);
            w.WriteEndObject();
            w.WriteEndObject();
        }
        return Encoding.UTF8.GetString(stream.ToArray());
    }

    public static void WriteSummary(TextWriter o, string pathA, string pathB, PairOutcome outcome, ImageFeatures a, ImageFeatures b, PairCommandTimings timings)
    {
        ArgumentNullException.ThrowIfNull(o);
        ArgumentNullException.ThrowIfNull(outcome);
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        ArgumentNullException.ThrowIfNull(timings);
        var c = CultureInfo.InvariantCulture;
        o.WriteLine(string.Create(c, $"{pathA} ({a.FullSize}, {outcome.FeatureCountA} features) -> {pathB} ({b.FullSize}, {outcome.FeatureCountB} features)"));
        o.WriteLine(string.Create(c, $"  {outcome.MatchCount} matches, {outcome.AmbiguousCount} ambiguous, {outcome.RelocalizedCount} re-localised at full resolution; descriptor {outcome.PatternVersion}"));
        EstimateOutput.WriteSummary(o, outcome.Estimate, a.FullSize, b.FullSize);
        var p = outcome.TimingsMs;
        o.WriteLine(string.Create(c, $"  total {timings.Total:0.0} ms: load {timings.Load:0.0}, features {timings.Features:0.0}, matching {p.Matching:0.0}, relocalization {p.Relocalization:0.0}"));
    }
}
