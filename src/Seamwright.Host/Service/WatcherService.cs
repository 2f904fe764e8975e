using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;

namespace Seamwright.Host.Service;

/// <summary>
/// Watches every root with a FileSystemWatcher whose events are only hints (pushed O(1) into a
/// bounded channel). On a watcher error the watcher is recreated and a full rescan requested;
/// full rescans are also requested periodically, because events can be lost (buffer overflow,
/// network shares, a stopped inotify thread: see docs/RELIABILITY.md); changes such a rescan finds
/// that no event reported make the scheduler recreate that watcher (MissedEventDetector).
/// Nothing is ever written into a watched root.
/// </summary>
internal sealed partial class WatcherService(ServiceRuntime runtime, IHostApplicationLifetime lifetime, ILogger<WatcherService> log) : BackgroundService
{
    private readonly Dictionary<int, FileSystemWatcher> _watchers = [];
    private readonly object _gate = new();

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        try
        {
            for (int i = 0; i < runtime.Roots.Count; i++)
            {
                Create(i);
            }
            var period = TimeSpan.FromSeconds(runtime.Options.Service.RescanSeconds);
            runtime.RestartWatcher = Create;
            runtime.Ops?.Health.Register(LoopName, period * 3);
            while (!stoppingToken.IsCancellationRequested)
            {
                runtime.Ops?.Health.Beat(LoopName);
                await Task.Delay(period, stoppingToken).ConfigureAwait(false);
                runtime.RequestPeriodicRescan();
            }
        }
        catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
        {
        }
        catch (Exception e)
        {
            LogFatal(log, e);
            runtime.SetFatal(e);
            lifetime.StopApplication();
        }
        finally
        {
            lock (_gate)
            {
                foreach (var w in _watchers.Values)
                {
                    w.Dispose();
                }
                _watchers.Clear();
            }
        }
    }

    private void Create(int root)
    {
        string path = runtime.Roots[root].Catalog.RootPath;
        var w = new FileSystemWatcher(path)
        {
            IncludeSubdirectories = true,
            NotifyFilter = NotifyFilters.FileName | NotifyFilters.DirectoryName | NotifyFilters.Size | NotifyFilters.LastWrite,
            InternalBufferSize = 64 * 1024,
        };
        bool deaf = WatcherTestHooks.TakeDeafWatcher();
        w.Created += (_, e) => Hint(root, e.FullPath, deaf);
        w.Changed += (_, e) => Hint(root, e.FullPath, deaf);
        w.Deleted += (_, e) => Hint(root, e.FullPath, deaf);
        w.Renamed += (_, e) =>
        {
            Hint(root, e.OldFullPath, deaf);
            Hint(root, e.FullPath, deaf);
        };
        w.Error += (_, e) => OnError(root, e.GetException());
        w.EnableRaisingEvents = true;
        lock (_gate)
        {
            if (_watchers.Remove(root, out var old))
            {
                old.Dispose();
            }
            _watchers[root] = w;
        }
        LogWatching(log, path);
    }

    private const string LoopName = "watcher";

    /// <summary>Every event is a hint; a watcher made deaf by the test hook drops them (a silent watcher).</summary>
    private void Hint(int root, string path, bool deaf)
    {
        if (!deaf)
        {
            runtime.Hint(root, path);
        }
    }

    private void OnError(int root, Exception e)
    {
        LogWatcherError(log, runtime.Roots[root].Catalog.RootPath, e);
        runtime.RequestRescan();
        _ = Task.Run(async () =>
        {
            // Recreate after a short pause (a disconnected share may need a moment); retry until it works.
            for (int attempt = 0; attempt < 1000; attempt++)
            {
                try
                {
                    await Task.Delay(TimeSpan.FromSeconds(Math.Min(30, 1 + attempt)), lifetime.ApplicationStopping).ConfigureAwait(false);
                    Create(root);
                    runtime.RequestRescan();
                    return;
                }
                catch (OperationCanceledException)
                {
                    return;
                }
                catch (Exception x) when (x is IOException or ArgumentException or UnauthorizedAccessException or PlatformNotSupportedException)
                {
                    LogWatcherError(log, runtime.Roots[root].Catalog.RootPath, x);
                }
            }
        });
    }

    [LoggerMessage(Level = LogLevel.Information, Message = "Watching {Root}")]
    private static partial void LogWatching(ILogger logger, string root);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Watcher error on {Root}; recreating it and rescanning")]
    private static partial void LogWatcherError(ILogger logger, string root, Exception error);

    [LoggerMessage(Level = LogLevel.Critical, Message = "The watcher loop failed")]
    private static partial void LogFatal(ILogger logger, Exception error);
}
