using Microsoft.Extensions.Configuration;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Configuration;

/// <summary>
/// Builds the configuration: the settings file (config/appsettings.json beside the executable,
/// or --config FILE), then environment variables (<c>Seamwright__Service__StableSeconds=5</c>), then
/// command-line overrides (<c>--Seamwright:Engine=checksum</c>); later sources win.
/// </summary>
internal static class SettingsLoader
{
    public static string DefaultConfigFile => Path.Combine(AppContext.BaseDirectory, "config", "appsettings.json");

    public static IConfigurationBuilder AddSeamwrightSources(this IConfigurationBuilder builder, string? configFile, string[] overrides, bool reloadOnChange)
    {
        string file = Path.GetFullPath(configFile ?? DefaultConfigFile);
        if (configFile is not null && !File.Exists(file))
        {
            throw new SettingsException($"The settings file {file} does not exist (--config).");
        }
        builder.AddJsonFile(file, optional: configFile is null, reloadOnChange: reloadOnChange);
        builder.AddEnvironmentVariables();
        builder.AddCommandLine(overrides);
        return builder;
    }

    public static IConfiguration Build(string? configFile, string[] overrides) =>
        new ConfigurationBuilder().AddSeamwrightSources(configFile, overrides, reloadOnChange: false).Build();

    /// <summary>Binds and validates; throws <see cref="SettingsException"/> naming every bad setting.</summary>
    public static SeamwrightOptions Bind(IConfiguration config)
    {
        var options = new SeamwrightOptions();
        try
        {
            config.GetSection(SeamwrightOptions.SectionName).Bind(options);
        }
        catch (InvalidOperationException e)
        {
            throw new SettingsException("A setting has a value of the wrong type: " + e.Message + (e.InnerException is null ? "" : " (" + e.InnerException.Message + ")"));
        }
        var errors = SettingsValidator.Check(options);
        if (errors.Count > 0)
        {
            throw new SettingsException("Invalid settings:" + Environment.NewLine + string.Join(Environment.NewLine, errors.Select(e => "  " + e)));
        }
        return options;
    }
}

/// <summary>Bad arguments or settings (exit code 2).</summary>
internal sealed class SettingsException : Exception
{
    public SettingsException() { }

    public SettingsException(string message) : base(message) { }

    public SettingsException(string message, Exception inner) : base(message, inner) { }
}
