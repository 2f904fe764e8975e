using System.Globalization;

namespace Seamwright.Tests.Support;

/// <summary>
/// Reads samples out of the Prometheus text exposition format ("name{label="value",...} number"
/// lines, from the Prometheus documentation, exposition formats, from memory), whatever the order
/// of the labels.
/// </summary>
internal static class PrometheusText
{
    /// <summary>The value of the first sample of <paramref name="name"/> carrying every one of <paramref name="labels"/>, or null.</summary>
    public static double? Value(string text, string name, params (string Label, string Value)[] labels)
    {
        ArgumentNullException.ThrowIfNull(text);
        foreach (string line in text.Split('\n'))
        {
            if (!line.StartsWith(name + "{", StringComparison.Ordinal) && !line.StartsWith(name + " ", StringComparison.Ordinal))
            {
                continue;
            }
            int close = line.LastIndexOf('}');
            string head = close < 0 ? line[..name.Length] : line[..(close + 1)];
            if (labels.All(l => head.Contains($"{l.Label}=\"{l.Value}\"", StringComparison.Ordinal)))
            {
                string rest = line[head.Length..].Trim().Split(' ')[0];
                return double.Parse(rest, NumberStyles.Float, CultureInfo.InvariantCulture);
            }
        }
        return null;
    }
}
