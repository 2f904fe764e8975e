using System.Globalization;
using Microsoft.Extensions.Configuration;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Configuration;

/// <summary>
/// Setting keys that were renamed and are still read for one release: the old key's value is
/// taken when the new key is absent, and every use of an old key gives a warning naming the new one.
/// </summary>
internal static class RenamedSettings
{
    /// <summary>Keys inside a profile (<c>Seamwright:Profiles:NAME:...</c>): old, new.</summary>
    private static readonly (string Old, string New)[] ProfileKeys =
    [
        ("Features:WorkingMegapixels", "Features:AnalysisMegapixels"),
    ];

    /// <summary>Applies the old keys' values to <paramref name="options"/> (already bound); returns one warning per old key in use.</summary>
    public static List<string> Apply(IConfiguration config, SeamwrightOptions options)
    {
        ArgumentNullException.ThrowIfNull(config);
        ArgumentNullException.ThrowIfNull(options);
        var warnings = new List<string>();
        foreach (var profile in config.GetSection(SeamwrightOptions.SectionName + ":Profiles").GetChildren())
        {
            foreach (var (oldKey, newKey) in ProfileKeys)
            {
                if (profile[oldKey] is not { } value)
                {
                    continue;
                }
                string oldPath = profile.Path + ":" + oldKey, newPath = profile.Path + ":" + newKey;
                if (profile[newKey] is not null)
                {
                    warnings.Add($"{oldPath} is deprecated and ignored because {newPath} is set; remove it");
                    continue;
                }
                if (!double.TryParse(value, NumberStyles.Float, CultureInfo.InvariantCulture, out double v))
                {
                    string allowed = SettingsValidator.AllowedFor(newPath) is { } range ? "; allowed: " + range : "";
                    throw new SettingsException($"A setting has a value of the wrong type: '{value}' at '{oldPath}' is not a number{allowed}");
                }
                Set(options.Profiles[profile.Key], newKey, v);
                warnings.Add($"{oldPath} is deprecated and will not be read after this release; rename it to {newPath} (its value {value} is used)");
            }
        }
        return warnings;
    }

    private static void Set(ProfileSettings p, string newKey, double value)
    {
        switch (newKey)
        {
            case "Features:AnalysisMegapixels":
                p.Features.AnalysisMegapixels = value;
                break;
            default:
                throw new InvalidOperationException("No setter for the renamed key " + newKey);
        }
    }
}
