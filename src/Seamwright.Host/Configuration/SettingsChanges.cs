using Microsoft.Extensions.Configuration;

namespace Seamwright.Host.Configuration;

/// <summary>
/// What a settings reload changed: the flattened <c>Seamwright</c> section before and after,
/// compared key by key, in words for the log ("A: 5 -> 6; B added (x); C removed").
/// </summary>
internal static class SettingsChanges
{
    /// <summary>Every leaf key of the Seamwright and Serilog sections with its value.</summary>
    public static Dictionary<string, string?> Snapshot(IConfiguration config)
    {
        ArgumentNullException.ThrowIfNull(config);
        var d = new Dictionary<string, string?>(StringComparer.OrdinalIgnoreCase);
        foreach (var section in new[] { "Seamwright", "Serilog" })
        {
            foreach (var (k, v) in config.GetSection(section).AsEnumerable())
            {
                if (v is not null)
                {
                    d[k] = v;
                }
            }
        }
        return d;
    }

    /// <summary>The differences in words, keys in ordinal order; empty when none.</summary>
    public static List<string> Describe(IReadOnlyDictionary<string, string?> before, IReadOnlyDictionary<string, string?> after)
    {
        ArgumentNullException.ThrowIfNull(before);
        ArgumentNullException.ThrowIfNull(after);
        var changes = new List<string>();
        foreach (string k in before.Keys.Union(after.Keys, StringComparer.OrdinalIgnoreCase).Order(StringComparer.OrdinalIgnoreCase))
        {
            bool had = before.TryGetValue(k, out var old);
            bool has = after.TryGetValue(k, out var now);
            if (had && has && !string.Equals(old, now, StringComparison.Ordinal))
            {
                changes.Add($"{k}: {old} -> {now}");
            }
            else if (!had && has)
            {
                changes.Add($"{k} added ({now})");
            }
            else if (had && !has)
            {
                changes.Add($"{k} removed (was {old})");
            }
        }
        return changes;
    }
}
