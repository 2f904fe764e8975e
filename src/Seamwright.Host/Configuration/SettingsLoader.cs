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

    /// <summary>
    /// Adds the sources. A settings file that cannot be parsed stops the load with a
    /// <see cref="SettingsException"/> naming the file and the parser's line; on a reload
    /// (<paramref name="reloadFailed"/> given) it is reported there instead and the load is ignored.
    /// </summary>
    public static IConfigurationBuilder AddSeamwrightSources(this IConfigurationBuilder builder, string? configFile, string[] overrides, bool reloadOnChange,
        SettingsReloadGuard? reloadFailed = null)
    {
        string file = Path.GetFullPath(configFile ?? DefaultConfigFile);
        if (configFile is not null && !File.Exists(file))
        {
            throw new SettingsException($"The settings file {file} does not exist (--config).");
        }
        builder.AddJsonFile(s =>
        {
            s.Path = file;
            s.Optional = configFile is null;
            s.ReloadOnChange = reloadOnChange;
            s.ResolveFileProvider();
            s.OnLoadException = ctx =>
            {
                string reason = Unreadable(file, ctx.Exception);
                if (reloadFailed is { Armed: true })
                {
                    reloadFailed.Failed(reason);
                    ctx.Ignore = true;
                    return;
                }
                throw new SettingsException(reason, ctx.Exception);
            };
        });
        builder.AddEnvironmentVariables();
        builder.AddCommandLine(overrides);
        return builder;
    }

    /// <summary>"The settings file F is not valid JSON: ... LineNumber: n ..." from the parser's own message.</summary>
    private static string Unreadable(string file, Exception e) =>
        $"The settings file {file} cannot be read: {e.GetBaseException().Message}";

    public static IConfiguration Build(string? configFile, string[] overrides) =>
        new ConfigurationBuilder().AddSeamwrightSources(configFile, overrides, reloadOnChange: false).Build();

    /// <summary>
    /// Binds and validates; throws <see cref="SettingsException"/> naming every bad setting. Warnings
    /// (renamed keys still in use, <see cref="RenamedSettings"/>) go to standard error.
    /// </summary>
    public static SeamwrightOptions Bind(IConfiguration config)
    {
        var options = Bind(config, out var warnings);
        foreach (var w in warnings)
        {
            System.Console.Error.WriteLine("seamwright: warning: " + w);
        }
        return options;
    }

    /// <summary>Binds and validates, returning the warnings for the caller to log.</summary>
    public static SeamwrightOptions Bind(IConfiguration config, out IReadOnlyList<string> warnings)
    {
        ArgumentNullException.ThrowIfNull(config);
        var options = new SeamwrightOptions();
        try
        {
            config.GetSection(SeamwrightOptions.SectionName).Bind(options);
        }
        catch (InvalidOperationException e)
        {
            string allowed = WrongTypeKey(e.Message) is { } key && SettingsValidator.AllowedFor(key) is { } range ? "; allowed: " + range : "";
            throw new SettingsException("A setting has a value of the wrong type: " + e.Message + (e.InnerException is null ? "" : " (" + e.InnerException.Message + ")") + allowed);
        }
        warnings = RenamedSettings.Apply(config, options);
        var errors = SettingsValidator.Check(options);
        if (errors.Count > 0)
        {
            throw new SettingsException("Invalid settings:" + Environment.NewLine + string.Join(Environment.NewLine, errors.Select(e => "  " + e)));
        }
        return options;
    }

    /// <summary>The key in .NET's conversion message ("Failed to convert configuration value 'x' at 'Seamwright:A:B' to type ...").</summary>
    internal static string? WrongTypeKey(string message)
    {
        var m = System.Text.RegularExpressions.Regex.Match(message, @" at '([^']+)'", System.Text.RegularExpressions.RegexOptions.CultureInvariant, TimeSpan.FromSeconds(1));
        return m.Success ? m.Groups[1].Value : null;
    }
}

/// <summary>
/// The settings file's reload failures while the service runs: armed once the service's
/// configuration is built, so a file that cannot be parsed at start still stops it.
/// </summary>
internal sealed class SettingsReloadGuard
{
    private string? _failure;

    public bool Armed { get; set; }

    public void Failed(string reason) => Volatile.Write(ref _failure, reason);

    /// <summary>The failure of the latest load, once (null when it loaded).</summary>
    public string? Take() => Interlocked.Exchange(ref _failure, null);
}

/// <summary>Bad arguments or settings (exit code 2).</summary>
internal sealed class SettingsException : Exception
{
    public SettingsException() { }

    public SettingsException(string message) : base(message) { }

    public SettingsException(string message, Exception inner) : base(message, inner) { }
}
