using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Json.Serialization.Metadata;

namespace Seamwright.Pipeline.Output;

/// <summary>
/// Serialises and reads our output documents: UTF-8, camelCase, shortest round-trip numbers, and
/// file names written as they are (no \u escapes for '+' or non-ASCII letters).
/// </summary>
public static class OutputJson
{
    private static readonly JsonSerializerOptions Indented = new(IndentedJson.Default.Options) { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };
    private static readonly JsonSerializerOptions Compact = new(CompactJson.Default.Options) { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };

    private static JsonTypeInfo<T> Info<T>(JsonSerializerOptions o) => (JsonTypeInfo<T>)o.GetTypeInfo(typeof(T));

    public static byte[] Sidecar(SidecarDocument d) => JsonSerializer.SerializeToUtf8Bytes(d, Info<SidecarDocument>(Indented));

    public static byte[] Manifest(ManifestDocument d) => JsonSerializer.SerializeToUtf8Bytes(d, Info<ManifestDocument>(Indented));

    public static byte[] TiePoints(TiePointsDocument d) => JsonSerializer.SerializeToUtf8Bytes(d, Info<TiePointsDocument>(Compact));

    /// <summary>One line of the confidence log (no newline).</summary>
    public static string ConfidenceLine(ConfidenceRecord r) => JsonSerializer.Serialize(r, Info<ConfidenceRecord>(Compact));

    public static ConfidenceRecord ReadConfidenceLine(string line) =>
        JsonSerializer.Deserialize(line, Info<ConfidenceRecord>(Compact)) ?? throw new InvalidDataException("empty confidence record");

    public static SidecarDocument ReadSidecar(string path) =>
        JsonSerializer.Deserialize(File.ReadAllBytes(path), Info<SidecarDocument>(Indented)) ?? throw new InvalidDataException("empty sidecar " + path);

    public static ManifestDocument ReadManifest(string path) =>
        JsonSerializer.Deserialize(File.ReadAllBytes(path), Info<ManifestDocument>(Indented)) ?? throw new InvalidDataException("empty manifest " + path);

    public static TiePointsDocument ReadTiePoints(string path) =>
        JsonSerializer.Deserialize(File.ReadAllBytes(path), Info<TiePointsDocument>(Compact)) ?? throw new InvalidDataException("empty tie points " + path);
}
