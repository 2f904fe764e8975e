using System.Globalization;
using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Host.Commands;

/// <summary>
/// The <c>estimate</c> command's outputs. JSON fields are written in a fixed order with shortest
/// round-trip numbers, so two runs differ only in <c>timingsMs</c>. Non-finite numbers become null.
/// </summary>
internal static class EstimateOutput
{
    public static string ModelName(MotionModel model) => MotionFamily.Of(model).Name;

    public static string StatusName(PairStatus status) => status.Word();

    public static string ToJson(PairEstimate e, ImageSize sizeA, ImageSize sizeB)
    {
        ArgumentNullException.ThrowIfNull(e);
        using var stream = new MemoryStream();
        // Relaxed escaping keeps reasons readable ("8 + 0.3 x n", not "8 \u002B 0.3"); the output is
        // a terminal or a file, never HTML.
        using (var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping }))
        {
            w.WriteStartObject();
            WriteEstimateFields(w, e);
            Size(w, "sizeA", sizeA);
            Size(w, "sizeB", sizeB);
            w.WriteStartObject("timingsMs");
            Timing(w, "sampling", e.TimingsMs.Sampling);
            Timing(w, "refinement", e.TimingsMs.Refinement);
            Timing(w, "polish", e.TimingsMs.Polish);
            Timing(w, "total", e.TimingsMs.Total);
            w.WriteEndObject();
            w.WriteEndObject();
        }
        return Encoding.UTF8.GetString(stream.ToArray());
    }

    /// <summary>
    /// The estimate's own fields, in the fixed order shared by every command that reports a pair
    /// (<c>estimate</c>, <c>pair</c>); the caller writes the enclosing object and what follows.
    /// </summary>
    public static void WriteEstimateFields(Utf8JsonWriter w, PairEstimate e)
    {
        ArgumentNullException.ThrowIfNull(w);
        ArgumentNullException.ThrowIfNull(e);
        w.WriteString("model", ModelName(e.Model));
        w.WritePropertyName("homography");
        if (e.Transform is { } h)
        {
            w.WriteStartArray();
            foreach (var row in h.Normalized().ToRows())
            {
                w.WriteStartArray();
                foreach (double v in row)
                {
                    Number(w, v);
                }
                w.WriteEndArray();
            }
            w.WriteEndArray();
        }
        else
        {
            w.WriteNullValue();
        }
        w.WriteNumber("matchCount", e.MatchCount);
        w.WriteNumber("inlierCount", e.InlierIndices.Length);
        w.WriteStartArray("inlierIndices");
        foreach (int i in e.InlierIndices)
        {
            w.WriteNumberValue(i);
        }
        w.WriteEndArray();
        w.WriteStartObject("consensus");
        w.WriteNumber("sampling", e.Consensus.Sampling);
        w.WriteNumber("refined", e.Consensus.Refined);
        w.WriteNumber("final", e.Consensus.Final);
        w.WriteNumber("runnerUp", e.Consensus.RunnerUp);
        w.WriteEndObject();
        w.WritePropertyName("threshold");
        Number(w, e.Threshold);
        w.WriteNumber("seed", e.Seed);
        w.WriteString("status", StatusName(e.Status));
        w.WriteString("featurePath", e.FeaturePath.Word());
        w.WriteStartArray("reasons");
        foreach (string r in e.Reasons)
        {
            w.WriteStringValue(r);
        }
        w.WriteEndArray();
        w.WritePropertyName("cornerSigmaPx");
        Number(w, e.CornerSigmaPx);
        w.WritePropertyName("rmsResidualPx");
        Number(w, e.RmsResidualPx);
        w.WriteNumber("iterations", e.Iterations);
        w.WriteNumber("lpCount", e.LpCount);
        w.WriteStartArray("terminations");
        foreach (string t in e.Terminations)
        {
            w.WriteStringValue(t);
        }
        w.WriteEndArray();
    }

    public static void WriteSummary(TextWriter o, PairEstimate e, ImageSize sizeA, ImageSize sizeB)
    {
        ArgumentNullException.ThrowIfNull(o);
        ArgumentNullException.ThrowIfNull(e);
        var c = CultureInfo.InvariantCulture;
        o.WriteLine(string.Create(c, $"{ModelName(e.Model)} from {e.MatchCount} matches ({sizeA} -> {sizeB}, threshold {e.Threshold} px, seed {e.Seed}, {e.FeaturePath.Word()}): {StatusName(e.Status)}"));
        o.WriteLine(string.Create(c, $"  consensus: sampling {e.Consensus.Sampling}, refined {e.Consensus.Refined}, final {e.Consensus.Final}, runner-up {e.Consensus.RunnerUp}"));
        if (e.Transform is { } h)
        {
            double ratio = e.MatchCount > 0 ? 100.0 * e.InlierIndices.Length / e.MatchCount : 0;
            o.WriteLine(string.Create(c, $"  inliers {e.InlierIndices.Length} ({ratio:0.0} %), rms {e.RmsResidualPx:0.###} px, corner sigma {e.CornerSigmaPx:0.###} px"));
            var n = h.Normalized();
            o.WriteLine(string.Create(c, $"  H = [{n.M11:G9} {n.M12:G9} {n.M13:G9}; {n.M21:G9} {n.M22:G9} {n.M23:G9}; {n.M31:G9} {n.M32:G9} {n.M33:G9}]"));
        }
        else
        {
            o.WriteLine("  no model");
        }
        foreach (string r in e.Reasons)
        {
            o.WriteLine("  - " + r);
        }
        o.WriteLine(string.Create(c, $"  {e.Iterations} samples, {e.LpCount} linear programs; {e.TimingsMs.Total:0.0} ms (sampling {e.TimingsMs.Sampling:0.0}, refinement {e.TimingsMs.Refinement:0.0}, polish {e.TimingsMs.Polish:0.0})"));
    }

    internal static void Number(Utf8JsonWriter w, double v)
    {
        if (double.IsFinite(v))
        {
            w.WriteNumberValue(v);
        }
        else
        {
            w.WriteNullValue();
        }
    }

    internal static void Timing(Utf8JsonWriter w, string name, double ms)
    {
        w.WritePropertyName(name);
        Number(w, Math.Round(ms, 3));
    }

    internal static void Size(Utf8JsonWriter w, string name, ImageSize size)
    {
        w.WriteStartObject(name);
        w.WriteNumber("width", size.Width);
        w.WriteNumber("height", size.Height);
        w.WriteEndObject();
    }
}
