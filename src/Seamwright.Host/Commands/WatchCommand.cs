using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Primitives;
using Seamwright.Host.Configuration;
using Seamwright.Host.Operations;
using Seamwright.Host.Service;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;
using Serilog;
using Serilog.Settings.Configuration;

namespace Seamwright.Host.Commands;

/// <summary>
/// <c>seamwright watch [--config FILE] [ROOT [--output DIR]]</c>: the service. Watches the configured
/// roots (or ROOT), processes every set when complete, and keeps going until stopped. Runs under
/// a Windows service manager or systemd (notify) as well as from a shell. Exit code 0 on a clean
/// stop, 2 for bad settings, 1 for a fatal error (so the service manager restarts it).
/// </summary>
internal static class WatchCommand
{
    public const string Usage = "watch [ROOT [--output DIR]] [--config FILE]";

    public static int Execute(string[] args)
    {
        if (ReadSettings(args, out var a, out var options, out var warnings) is int bad)
        {
            return bad;
        }
        var reloadGuard = new SettingsReloadGuard();
        if (TryCreateBuilder(a, options, warnings, reloadGuard, out var builder) is int unreadable)
        {
            return unreadable;
        }

        var sessions = new List<RootSession>();
        using var handoff = new SetDoneHandoff(Log.Logger);
        bool started = false;
        ServiceOperations ops;
        try
        {
            ops = new ServiceOperations(builder.Configuration, TimeProvider.System);
        }
        catch (SettingsException e)
        {
            Log.CloseAndFlush();
            return RunCommand.Bad(e.Message);
        }
        try
        {
            using var loggerFactory = new Serilog.Extensions.Logging.SerilogLoggerFactory(Log.Logger);
            OpenSessions(options, ops, loggerFactory, sessions);
            var runtime = new ServiceRuntime(sessions, options) { Ops = ops, Handoff = handoff };
            builder.Services.AddSingleton(runtime);
            ops.AddTo(builder.Services, sessions.Select(s => Path.GetFullPath(s.Catalog.RootPath)).ToList(),
                sessions.Select(s => s.Context).ToList(), LogFolderOf(builder.Configuration));
            LogSupervision(ops);
            builder.Services.AddHostedService<WatcherService>();
            builder.Services.AddHostedService<SchedulerService>();
            builder.Services.AddHostedService<WorkerService>();
            builder.Services.AddHostedService<LeaseService>();
            using var host = builder.Build();
            var loops = HostExit.LoopsOf(host);
            var operations = host.Services.GetService<OperationsLoop>(); // resolved now: Run disposes the host's services
            host.Services.GetRequiredService<IHostApplicationLifetime>().ApplicationStarted.Register(() => started = true);
            using var reload = WatchReloads(builder.Configuration, a, runtime, reloadGuard);
            host.Run();
            if (HostExit.CodeFor(loops, runtime.Fatal) != ExitCodes.Ok)
            {
                Log.Fatal(runtime.Fatal ?? HostExit.FirstFault(loops), "Stopped by a fatal error");
                return ExitCodes.Fatal;
            }
            operations?.WriteStopped();
            Log.Information("Stopped");
            return ExitCodes.Ok;
        }
        catch (Exception e) when (!started && e is OutputRootBusyException or DirectoryNotFoundException or NotSupportedException or IOException or UnauthorizedAccessException or InvalidOperationException)
        {
            // A start-up error (lock held, missing folder, port in use, output not writable): one
            // line, exit 2, so a service manager does not restart into the same error.
            Log.Fatal("Cannot start: {Message}", e.Message);
            Log.CloseAndFlush();
            System.Console.Error.WriteLine("seamwright: cannot start: " + e.Message);
            return ExitCodes.BadArguments;
        }
        catch (Exception e) when (e is OutputRootBusyException or System.Data.Common.DbException or DirectoryNotFoundException or NotSupportedException or IOException or UnauthorizedAccessException or InvalidOperationException)
        {
            Log.Fatal(e, "Stopped by a fatal error: {Message}", e.Message);
            System.Console.Error.WriteLine("seamwright: " + e.Message);
            return ExitCodes.Fatal;
        }
        finally
        {
            // Hand-offs get the shutdown time, then the workers (cancelled with the host), then ledgers and roots.
            handoff.WaitAll(TimeSpan.FromSeconds(options.Service.ShutdownSeconds));
            ops.DisposeAsync().AsTask().GetAwaiter().GetResult();
            foreach (var s in sessions)
            {
                s.Dispose();
            }
            Log.CloseAndFlush();
        }
    }

    private static void LogSupervision(ServiceOperations ops)
    {
        if (ops.Pool is not null)
        {
            Log.Information("Decoding in {Workers} supervised worker processes: {Timeout} s and {Memory} MiB per job, quarantine after {Strikes} strikes",
                ops.Supervision.Workers, ops.Supervision.JobTimeoutSeconds, ops.Supervision.MemoryCapMegabytes, ops.Supervision.StrikesBeforeQuarantine);
        }
    }

    /// <summary>Opens every root's session (ledger, output lock, engine under supervision) into <paramref name="sessions"/>, so a failure still disposes those opened.</summary>
    private static void OpenSessions(SeamwrightOptions options, ServiceOperations ops, Microsoft.Extensions.Logging.ILoggerFactory loggerFactory, List<RootSession> sessions)
    {
        var engine = EngineFactory.Create(options.Engine);
        var supervisionLog = loggerFactory.CreateLogger("Seamwright.Supervision");
        var budget = new MemoryBudget((long)options.Service.MemoryBudgetMegabytes << 20);
        var slots = new SemaphoreSlim(options.Service.MaxParallelJobs);
        var observer = new ServiceObserver(Log.Logger, ops.Metrics);
        foreach (var root in options.Roots)
        {
            var session = RootSession.Open(root, options, ops.EngineFor(root, options, engine, supervisionLog), budget, slots, observer);
            session.Context.Review = new RigBaselineReview(loggerFactory.CreateLogger("Seamwright.RigBaseline"));
            sessions.Add(session);
            OneShot.Announce(session, Log.Logger);
            Log.Information("Serving root {Root} into {Output}", root.Path, session.Context.OutputRoot);
        }
    }

    /// <summary>Parses the arguments and binds and validates the settings; an exit code when they are bad, else null.</summary>
    private static int? ReadSettings(string[] args, out CommandArgs a, out SeamwrightOptions options, out IReadOnlyList<string> warnings)
    {
        a = null!;
        options = null!;
        warnings = [];
        try
        {
            a = CommandArgs.Parse(args, ["--output", "--config"], []);
            if (a.Positional.Count > 1)
            {
                return RunCommand.Bad("watch takes at most one ROOT: seamwright " + Usage);
            }
            var config = SettingsLoader.Build(a.Value("--config"), a.Overrides.ToArray());
            options = SettingsLoader.Bind(config, out warnings);
            ApplyCommandLineRoot(options, a);
            if (options.Roots.Count == 0)
            {
                return RunCommand.Bad("no root to watch: configure Seamwright:Roots or give ROOT: seamwright " + Usage);
            }
            if (options.Roots.FirstOrDefault(r => !Directory.Exists(r.Path)) is { } missing)
            {
                return RunCommand.Bad($"the folder to watch does not exist: {Path.GetFullPath(missing.Path)}");
            }
        }
        catch (SettingsException e)
        {
            return RunCommand.Bad(e.Message);
        }
        return null;
    }

    /// <summary>The builder with the reload guard armed, or exit 2 when a settings file cannot be parsed (file and line named).</summary>
    private static int? TryCreateBuilder(CommandArgs a, SeamwrightOptions options, IReadOnlyList<string> warnings, SettingsReloadGuard reloadGuard, out HostApplicationBuilder builder)
    {
        builder = null!;
        try
        {
            builder = CreateBuilder(a, options, reloadGuard);
        }
        catch (SettingsException e)
        {
            return RunCommand.Bad(e.Message);
        }
        foreach (var w in warnings)
        {
            Log.Warning("Settings: {Warning}", w); // logged once the logger is configured
        }
        reloadGuard.Armed = true;
        return null;
    }

    /// <summary>The Generic Host builder: settings sources (reloading), service managers, shutdown, Serilog.</summary>
    private static HostApplicationBuilder CreateBuilder(CommandArgs a, SeamwrightOptions options, SettingsReloadGuard reloadGuard)
    {
        var builder = Microsoft.Extensions.Hosting.Host.CreateApplicationBuilder(new HostApplicationBuilderSettings
        {
            DisableDefaults = true,
            ContentRootPath = AppContext.BaseDirectory,
        });
        builder.Configuration.AddSeamwrightSources(a.Value("--config"), a.Overrides.ToArray(), reloadOnChange: true, reloadGuard);
        // Settings are bound and validated once, by SettingsLoader.Bind (above, and again on each
        // reload): no IOptions<SeamwrightOptions> is registered, since nothing would read it. Each set
        // run takes a RunPlan snapshot when it begins (docs/ARCHITECTURE.md), so a reload reaches
        // only runs that begin after it.
        builder.Services.AddWindowsService(o => o.ServiceName = "Seamwright");
        builder.Services.AddSystemd();
        builder.Services.Configure<HostOptions>(o =>
        {
            o.ShutdownTimeout = TimeSpan.FromSeconds(options.Service.ShutdownSeconds);
            o.BackgroundServiceExceptionBehavior = BackgroundServiceExceptionBehavior.StopHost;
        });
        var readerOptions = new ConfigurationReaderOptions(
            typeof(ConsoleLoggerConfigurationExtensions).Assembly, typeof(FileLoggerConfigurationExtensions).Assembly,
            typeof(Serilog.Formatting.Compact.CompactJsonFormatter).Assembly);
        // A settings file without a Serilog section still logs to the console.
        Log.Logger = builder.Configuration.GetSection("Serilog").Exists()
            ? new LoggerConfiguration().ReadFrom.Configuration(builder.Configuration, readerOptions).CreateLogger()
            : new LoggerConfiguration().MinimumLevel.Information().MinimumLevel.Override("Microsoft", Serilog.Events.LogEventLevel.Warning)
                .WriteTo.Console().CreateLogger();
        builder.Services.AddSerilog(Log.Logger, dispose: false);
        string settingsFile = SettingsFileOf(a);
        Log.Information("Settings file {File} ({State}); environment variables and command-line overrides win over it",
            settingsFile, File.Exists(settingsFile) ? "read" : "absent: built-in defaults");
        return builder;
    }

    private static void ApplyCommandLineRoot(SeamwrightOptions options, CommandArgs a)
    {
        if (a.Positional.Count == 1)
        {
            var root = options.RootFor(a.Positional[0], a.Value("--output") is { } o ? Path.GetFullPath(o) : null);
            options.Roots.Clear();
            options.Roots.Add(root);
        }
    }

    private static string SettingsFileOf(CommandArgs a) => Path.GetFullPath(a.Value("--config") ?? SettingsLoader.DefaultConfigFile);

    /// <summary>Applies each settings change from now on (see <see cref="Reload"/>); disposing stops it.</summary>
    private static IDisposable WatchReloads(ConfigurationManager config, CommandArgs a, ServiceRuntime runtime, SettingsReloadGuard guard)
    {
        var applied = SettingsChanges.Snapshot(config);
        string file = SettingsFileOf(a);
        return ChangeToken.OnChange(((IConfiguration)config).GetReloadToken,
            () => applied = Reload(config, a, runtime, guard, applied, file));
    }

    /// <summary>
    /// A settings file change: bind and validate; a file that cannot be parsed (file and parser's
    /// line) or a bad value (key and allowed range) is logged and ignored, the old settings stay.
    /// A good one is applied and the changed keys logged. Returns the settings now in force.
    /// </summary>
    private static Dictionary<string, string?> Reload(IConfiguration config, CommandArgs a, ServiceRuntime runtime, SettingsReloadGuard guard,
        Dictionary<string, string?> applied, string file)
    {
        if (guard.Take() is { } unreadable)
        {
            Log.Error("Settings reload ignored, the previous settings stay in force: {Message}", unreadable);
            return applied;
        }
        var now = SettingsChanges.Snapshot(config);
        var changes = SettingsChanges.Describe(applied, now);
        if (changes.Count == 0)
        {
            return applied; // saved without a change (or an echo of the same save)
        }
        try
        {
            var fresh = SettingsLoader.Bind(config, out var warnings);
            ApplyCommandLineRoot(fresh, a);
            runtime.Options = fresh;
            foreach (var s in runtime.Roots)
            {
                s.Context.Options = fresh;
            }
            runtime.SettingsChanged = true;
            Log.Information("Settings reloaded from {File}: {Changes}", file, string.Join("; ", changes));
            foreach (var w in warnings)
            {
                Log.Warning("Settings: {Warning}", w);
            }
            return now;
        }
        catch (SettingsException e)
        {
            Log.Error("Settings reload ignored, the previous settings stay in force: {Message}", e.Message);
            return applied;
        }
    }

    /// <summary>
    /// The folder the configured rolling file sink writes to (Serilog resolves a relative path
    /// against the working directory), so retention sweeps where the logs really are; null when
    /// no file sink is configured.
    /// </summary>
    internal static string? LogFolderOf(IConfiguration configuration)
    {
        foreach (var sink in configuration.GetSection("Serilog:WriteTo").GetChildren())
        {
            if (sink["Name"] == "File" && sink["Args:path"] is { Length: > 0 } path)
            {
                return Path.GetDirectoryName(Path.GetFullPath(path));
            }
        }
        return null;
    }
}
