using System.Text.Json;

namespace Seamwright.Pipeline.Output;

/// <summary>Serialises and reads our output documents (UTF-8, camelCase, shortest round-trip numbers).</summary>
public static class OutputJson
{
    public static byte[] Sidecar(SidecarDocument d) => JsonSerializer.SerializeToUtf8Bytes(d, IndentedJson.Default.SidecarDocument);

    public static byte[] Manifest(ManifestDocument d) => JsonSerializer.SerializeToUtf8Bytes(d, IndentedJson.Default.ManifestDocument);

    public static byte[] TiePoints(TiePointsDocument d) => JsonSerializer.SerializeToUtf8Bytes(d, CompactJson.Default.TiePointsDocument);

    public static SidecarDocument ReadSidecar(string path) =>
        JsonSerializer.Deserialize(File.ReadAllBytes(path), IndentedJson.Default.SidecarDocument) ?? throw new InvalidDataException("empty sidecar " + path);

    public static ManifestDocument ReadManifest(string path) =>
        JsonSerializer.Deserialize(File.ReadAllBytes(path), IndentedJson.Default.ManifestDocument) ?? throw new InvalidDataException("empty manifest " + path);

    public static TiePointsDocument ReadTiePoints(string path) =>
        JsonSerializer.Deserialize(File.ReadAllBytes(path), CompactJson.Default.TiePointsDocument) ?? throw new InvalidDataException("empty tie points " + path);
}
