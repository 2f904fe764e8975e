using System.Globalization;
using System.Text;
using System.Text.Json;
using Seamwright.Core.Cameras;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Output;

namespace Seamwright.Pipeline.Demo;

/// <summary>
/// Ground truth of a demo set, stored as <c>_truth.json</c> in the set folder:
/// <c>{"reference": "&lt;file name&gt;", "toReference": {"&lt;file name&gt;": [[..],[..],[..]], ...}}</c>.
/// Each 3x3 matrix (row-major rows, m33 = 1) maps that image's full-resolution pixels (centres
/// at integers) to the reference image's pixels; the reference maps by the identity. Sets of a
/// camera turning about its centre add <c>"cameras": {"&lt;file name&gt;": {"focalPx": f,
/// "rotation": [[..],[..],[..]]}}</c> (camera to world, x right, y down, z forward, as the
/// sidecar's camera block) and list under toReference only the frames that map into the
/// reference's plane.
/// </summary>
public sealed record DemoTruth(string Reference, IReadOnlyDictionary<string, Transform2D> ToReference)
{
    public const string FileName = "_truth.json";

    /// <summary>Per frame, the focal length and rotation (camera sets only; empty otherwise).</summary>
    public IReadOnlyDictionary<string, (double FocalPx, Matrix3 Rotation)> Cameras { get; init; } =
        new SortedDictionary<string, (double, Matrix3)>(StringComparer.Ordinal);

    public static DemoTruth From(DemoSet set)
    {
        ArgumentNullException.ThrowIfNull(set);
        var map = new SortedDictionary<string, Transform2D>(StringComparer.Ordinal);
        var cameras = new SortedDictionary<string, (double, Matrix3)>(StringComparer.Ordinal);
        foreach (var image in set.Images)
        {
            if (image.Camera is { } c)
            {
                cameras[image.FileName] = (c.FocalPx, c.Rotation);
            }
            if (set.MapsIntoReference(image))
            {
                map[image.FileName] = image.FileName == set.Reference ? Transform2D.Identity : set.ToReference(image);
            }
        }
        return new DemoTruth(set.Reference, map) { Cameras = cameras };
    }

    /// <summary>Indented JSON, one matrix row per line, numbers in shortest round-trip form.</summary>
    public byte[] ToJson()
    {
        var text = new StringBuilder();
        text.Append("{\n  \"reference\": ").Append(JsonSerializer.Serialize(Reference)).Append(",\n  \"toReference\": {");
        bool first = true;
        foreach (var (name, t) in ToReference.OrderBy(p => p.Key, StringComparer.Ordinal))
        {
            text.Append(first ? "\n" : ",\n").Append("    ").Append(JsonSerializer.Serialize(name)).Append(": [");
            first = false;
            double[][] rows = t.ToRows();
            for (int r = 0; r < 3; r++)
            {
                text.Append(r == 0 ? "[" : ", [");
                text.AppendJoin(", ", rows[r].Select(v => v.ToString("R", CultureInfo.InvariantCulture)));
                text.Append(']');
            }
            text.Append(']');
        }
        text.Append("\n  }");
        if (Cameras.Count > 0)
        {
            text.Append(",\n  \"cameras\": {");
            bool firstCamera = true;
            foreach (var (name, (focal, r)) in Cameras.OrderBy(p => p.Key, StringComparer.Ordinal))
            {
                text.Append(firstCamera ? "\n" : ",\n").Append("    ").Append(JsonSerializer.Serialize(name)).Append(": {\"focalPx\": ")
                    .Append(focal.ToString("R", CultureInfo.InvariantCulture)).Append(", \"rotation\": [");
                firstCamera = false;
                double[] m = r.ToRowMajor();
                for (int row = 0; row < 3; row++)
                {
                    text.Append(row == 0 ? "[" : ", [");
                    text.AppendJoin(", ", m.Skip(3 * row).Take(3).Select(v => v.ToString("R", CultureInfo.InvariantCulture)));
                    text.Append(']');
                }
                text.Append("]}");
            }
            text.Append("\n  }");
        }
        text.Append("\n}\n");
        return Encoding.UTF8.GetBytes(text.ToString());
    }

    public void Write(string path) => AtomicFile.WriteAllBytes(path, ToJson());

    public static DemoTruth Read(string path)
    {
        using var doc = JsonDocument.Parse(File.ReadAllBytes(path));
        var root = doc.RootElement;
        string reference = root.GetProperty("reference").GetString() ?? throw new InvalidDataException($"{path}: no reference");
        var map = new SortedDictionary<string, Transform2D>(StringComparer.Ordinal);
        foreach (var entry in root.GetProperty("toReference").EnumerateObject())
        {
            double[][] rows = [.. entry.Value.EnumerateArray().Select(r => r.EnumerateArray().Select(v => v.GetDouble()).ToArray())];
            map[entry.Name] = Transform2D.FromRows(rows);
        }
        var cameras = new SortedDictionary<string, (double, Matrix3)>(StringComparer.Ordinal);
        if (root.TryGetProperty("cameras", out var cams))
        {
            foreach (var entry in cams.EnumerateObject())
            {
                double[] m = [.. entry.Value.GetProperty("rotation").EnumerateArray().SelectMany(r => r.EnumerateArray().Select(v => v.GetDouble()))];
                cameras[entry.Name] = (entry.Value.GetProperty("focalPx").GetDouble(), Matrix3.FromRowMajor(m));
            }
        }
        return new DemoTruth(reference, map) { Cameras = cameras };
    }
}
