using Seamwright.Host.Configuration;

namespace Seamwright.Host.Commands;

/// <summary>Parsed arguments of a command: positional values, named options, flags and settings overrides.</summary>
internal sealed class CommandArgs
{
    public List<string> Positional { get; } = [];
    public Dictionary<string, string> Values { get; } = new(StringComparer.Ordinal);
    public HashSet<string> Flags { get; } = new(StringComparer.Ordinal);
    /// <summary>"--Seamwright:Key=value" settings overrides, passed to the configuration.</summary>
    public List<string> Overrides { get; } = [];

    public string? Value(string name) => Values.GetValueOrDefault(name);

    public bool Flag(string name) => Flags.Contains(name);

    /// <summary>Parses; <paramref name="valueOptions"/> take a value, <paramref name="flagOptions"/> do not.</summary>
    public static CommandArgs Parse(string[] args, string[] valueOptions, string[] flagOptions)
    {
        var r = new CommandArgs();
        for (int i = 0; i < args.Length; i++)
        {
            string a = args[i];
            if (a.StartsWith("--Seamwright:", StringComparison.OrdinalIgnoreCase) || a.StartsWith("--Serilog:", StringComparison.OrdinalIgnoreCase))
            {
                if (!a.Contains('=', StringComparison.Ordinal))
                {
                    if (i + 1 >= args.Length)
                    {
                        throw new SettingsException($"The setting override {a} needs a value ({a}=VALUE).");
                    }
                    r.Overrides.Add(a + "=" + args[++i]);
                }
                else
                {
                    r.Overrides.Add(a);
                }
            }
            else if (valueOptions.Contains(a))
            {
                if (i + 1 >= args.Length || args[i + 1].StartsWith("--", StringComparison.Ordinal))
                {
                    throw new SettingsException($"The option {a} needs a value.");
                }
                r.Values[a] = args[++i];
            }
            else if (flagOptions.Contains(a))
            {
                r.Flags.Add(a);
            }
            else if (a.StartsWith("--", StringComparison.Ordinal))
            {
                throw new SettingsException($"Unknown option {a}.");
            }
            else
            {
                r.Positional.Add(a);
            }
        }
        return r;
    }
}
