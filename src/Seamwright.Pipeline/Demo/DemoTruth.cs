using System.Globalization;
using System.Text;
using System.Text.Json;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Output;

namespace Seamwright.Pipeline.Demo;

/// <summary>
/// Ground truth of a demo set, stored as <c>_truth.json</c> in the set folder:
/// <c>{"reference": "&lt;file name&gt;", "toReference": {"&lt;file name&gt;": [[..],[..],[..]], ...}}</c>.
/// Each 3x3 matrix (row-major rows, m33 = 1) maps that image's full-resolution pixels (centres
/// at integers) to the reference image's pixels; the reference maps by the identity.
/// </summary>
public sealed record DemoTruth(string Reference, IReadOnlyDictionary<string, Transform2D> ToReference)
{
    public const string FileName = "_truth.json";

    public static DemoTruth From(DemoSet set)
    {
        ArgumentNullException.ThrowIfNull(set);
        var map = new SortedDictionary<string, Transform2D>(StringComparer.Ordinal);
        foreach (var image in set.Images)
        {
            map[image.FileName] = image.FileName == set.Reference ? Transform2D.Identity : set.ToReference(image);
        }
        return new DemoTruth(set.Reference, map);
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
        text.Append("\n  }\n}\n");
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
        return new DemoTruth(reference, map);
    }
}
