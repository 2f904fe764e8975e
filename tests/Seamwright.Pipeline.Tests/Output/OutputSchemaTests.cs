using System.Text.Json;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Output;

/// <summary>The JSON Schema files in docs/schemas/ describe exactly the fields our outputs carry.</summary>
public class OutputSchemaTests
{
    private static JsonElement Schema(string name) =>
        JsonDocument.Parse(File.ReadAllText(Path.Combine(RepoPaths.Root, "docs", "schemas", name))).RootElement;

    /// <summary>Keys of the object are all declared (when extra keys are not allowed) and every required key is present.</summary>
    private static void Conforms(JsonElement schema, JsonElement value, string where)
    {
        var declared = schema.GetProperty("properties").EnumerateObject().Select(p => p.Name).ToHashSet();
        var present = value.EnumerateObject().Select(p => p.Name).ToHashSet();
        foreach (var r in schema.GetProperty("required").EnumerateArray())
        {
            Assert.True(present.Contains(r.GetString()!), $"{where}: required '{r.GetString()}' missing");
        }
        if (schema.TryGetProperty("additionalProperties", out var extra) && extra.ValueKind == JsonValueKind.False)
        {
            Assert.True(present.IsSubsetOf(declared), $"{where}: undeclared fields {string.Join(", ", present.Except(declared))}");
        }
        if (schema.GetProperty("properties").TryGetProperty("schema", out var s) && s.TryGetProperty("const", out var c))
        {
            Assert.Equal(c.GetString(), value.GetProperty("schema").GetString());
        }
    }

    [Fact]
    public void Outputs_OfARun_ConformToTheirSchemaFiles()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        File.WriteAllText(dir.Sub("in/s/bad.png"), "not an image");
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        string setOut = dir.Sub("out/s");

        var sidecarSchema = Schema("seamwright.sidecar.v1.schema.json");
        var sidecar = JsonDocument.Parse(File.ReadAllText(Path.Combine(setOut, "img001.png.seam.json"))).RootElement;
        Conforms(sidecarSchema, sidecar, "sidecar");
        Conforms(sidecarSchema.GetProperty("$defs").GetProperty("link"), sidecar.GetProperty("links")[0], "sidecar link");

        var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(setOut, OutputLayout.ManifestName))).RootElement;
        var manifestSchema = Schema("seamwright.manifest.v1.schema.json");
        Conforms(manifestSchema, manifest, "manifest");
        Conforms(manifestSchema.GetProperty("properties").GetProperty("counts"), manifest.GetProperty("counts"), "manifest counts");
        var alignmentSchema = manifestSchema.GetProperty("properties").GetProperty("alignment");
        var alignment = manifest.GetProperty("alignment");
        Conforms(alignmentSchema, alignment, "manifest alignment");
        Conforms(manifestSchema.GetProperty("$defs").GetProperty("canvas"), alignment.GetProperty("canvas"), "manifest canvas");
        Conforms(manifestSchema.GetProperty("$defs").GetProperty("residuals"), alignment.GetProperty("residuals"), "manifest residuals");
        Conforms(alignmentSchema.GetProperty("properties").GetProperty("components").GetProperty("items"), alignment.GetProperty("components")[0], "manifest component");

        string ties = Directory.GetFiles(Path.Combine(setOut, OutputLayout.TiesFolder)).First();
        Conforms(Schema("seamwright.tiepoints.v1.schema.json"), JsonDocument.Parse(File.ReadAllText(ties)).RootElement, "tie points");

        var confidenceSchema = Schema("seamwright.confidence.v1.schema.json");
        foreach (var line in File.ReadAllLines(Path.Combine(dir.Sub("out"), ConfidenceLog.FileName)))
        {
            var rec = JsonDocument.Parse(line).RootElement;
            Conforms(confidenceSchema, rec, "confidence " + rec.GetProperty("kind").GetString());
            if (rec.GetProperty("kind").GetString() == "pair")
            {
                Conforms(confidenceSchema.GetProperty("properties").GetProperty("timingsMs"), rec.GetProperty("timingsMs"), "confidence timings");
            }
        }
    }

    [Fact]
    public void Outputs_BadFileSeedsTimeAndSchemaIds_NullForUnknownStringSeedsUtcTimeOneSpelling()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 3, 1);
        File.WriteAllText(dir.Sub("in/s/bad.png"), "not an image");
        using var session = Sessions.Open(dir.Sub("in"), dir.Sub("out"), Sessions.Options());
        var before = DateTime.UtcNow.AddSeconds(-1);
        new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
        var after = DateTime.UtcNow.AddSeconds(1);
        string setOut = dir.Sub("out/s");

        var lines = File.ReadAllLines(Path.Combine(dir.Sub("out"), ConfidenceLog.FileName)).Select(l => JsonDocument.Parse(l).RootElement).ToList();
        var bad = Assert.Single(lines, r => r.GetProperty("kind").GetString() == "file");
        foreach (string unknown in new[] { "inlierCount", "matchCount", "motionModel", "cornerSigmaPx", "rmsResidualPx", "seed", "timingsMs", "consensus", "homography" })
        {
            Assert.Equal(JsonValueKind.Null, bad.GetProperty(unknown).ValueKind); // never 0, which reads as perfect
        }
        foreach (var r in lines)
        {
            string time = r.GetProperty("time").GetString()!;
            Assert.EndsWith("Z", time, StringComparison.Ordinal);
            var t = DateTime.Parse(time, System.Globalization.CultureInfo.InvariantCulture, System.Globalization.DateTimeStyles.AdjustToUniversal);
            Assert.InRange(t, before, after);
        }
        var pair = lines.First(r => r.GetProperty("kind").GetString() == "pair");
        Assert.Equal(JsonValueKind.String, pair.GetProperty("seed").ValueKind);
        Assert.True(ulong.TryParse(pair.GetProperty("seed").GetString(), out _));

        var sidecar = JsonDocument.Parse(File.ReadAllText(Path.Combine(setOut, "img001.png.seam.json"))).RootElement;
        Assert.Equal(JsonValueKind.String, sidecar.GetProperty("baseSeed").ValueKind);
        Assert.Equal(JsonValueKind.String, sidecar.GetProperty("links")[0].GetProperty("seed").ValueKind);
        var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(setOut, OutputLayout.ManifestName))).RootElement;
        Assert.InRange(DateTime.Parse(manifest.GetProperty("time").GetString()!, System.Globalization.CultureInfo.InvariantCulture,
            System.Globalization.DateTimeStyles.AdjustToUniversal), before, after);
        Assert.Equal(ProcessingContext.ToolVersion, manifest.GetProperty("toolVersion").GetString());
        Assert.True(manifest.GetProperty("alignment").TryGetProperty("notPlanarReasons", out _));

        // One spelling: each file names its schema exactly as the schema file's $id (and its file name).
        foreach (var (name, doc) in new[] { ("sidecar", sidecar), ("manifest", manifest), ("confidence", pair),
                     ("tiepoints", JsonDocument.Parse(File.ReadAllText(Directory.GetFiles(Path.Combine(setOut, OutputLayout.TiesFolder)).First())).RootElement) })
        {
            string id = Schema($"seamwright.{name}.v1.schema.json").GetProperty("$id").GetString()!;
            Assert.Equal($"seamwright.{name}.v1", id);
            Assert.Equal(id, doc.GetProperty("schema").GetString());
        }
    }
}
