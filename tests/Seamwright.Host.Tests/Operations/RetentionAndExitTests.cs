using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Seamwright.Host.Operations;

namespace Seamwright.Host.Tests.Operations;

public sealed class RetentionAndExitTests : IDisposable
{
    private readonly string _folder = Directory.CreateTempSubdirectory("sw-retention-").FullName;
    private static readonly DateTimeOffset Now = new(2026, 12, 1, 0, 0, 0, TimeSpan.Zero);

    public void Dispose() => Directory.Delete(_folder, true);

    private sealed class FakeRuns : IRunRetention
    {
        public int Pruned { get; private set; } = -1;

        public IReadOnlyList<string> PruneOldRuns(int keepOld)
        {
            Pruned = keepOld;
            return ["pruned 2 runs"];
        }

        public DateTimeOffset? RunStartedAt(long run) => run switch
        {
            1 => Now.AddDays(-400),
            2 => Now.AddDays(-10),
            _ => null,
        };

        public void WithConfidenceLogLocked(string path, Action rewrite) => rewrite();
    }

    private string Touch(string relative, int daysOld)
    {
        string path = Path.Combine(_folder, relative);
        Directory.CreateDirectory(Path.GetDirectoryName(path)!);
        File.WriteAllText(path, "x");
        File.SetLastWriteTimeUtc(path, Now.AddDays(-daysOld).UtcDateTime);
        return path;
    }

    [Fact]
    public void Sweep_OldFiles_DeletedNewerKept()
    {
        string oldLog = Touch("logs/seamwright-1.log", 40);
        string oldestLogButNewest = Touch("logs/seamwright-2.log", 35);
        string freshLog = Touch("logs/seamwright-3.log", 1);
        string oldFeature = Touch("cache/fp/ab/abcd.bin", 90);
        string freshFeature = Touch("cache/fp/cd/cdef.bin", 3);
        string log = Path.Combine(_folder, "confidence.jsonl");
        File.WriteAllText(log, "{\"run\":1,\"set\":\"a\"}\n{\"run\":2,\"set\":\"a\"}\nnot json\n{\"run\":3}\n");
        var runs = new FakeRuns();
        var sweeper = new RetentionSweeper(new OperationsOptions(), Path.Combine(_folder, "logs"), [Path.Combine(_folder, "cache")], [log], runs);

        var notes = sweeper.Sweep(Now);

        Assert.False(File.Exists(oldLog));
        Assert.False(File.Exists(oldestLogButNewest));
        Assert.True(File.Exists(freshLog));
        Assert.False(File.Exists(oldFeature));
        Assert.False(Directory.Exists(Path.GetDirectoryName(oldFeature)));
        Assert.True(File.Exists(freshFeature));
        Assert.Equal("{\"run\":2,\"set\":\"a\"}\nnot json\n{\"run\":3}\n", File.ReadAllText(log));
        Assert.Equal(3, runs.Pruned);
        Assert.Contains("deleted 2 log files older than 30 days", notes);
        Assert.Contains("pruned 2 runs", notes);
    }

    [Fact]
    public void Sweep_OnlyLogFileIsOld_KeptAsNewest()
    {
        string only = Touch("logs/seamwright-1.log", 400);
        new RetentionSweeper(new OperationsOptions(), Path.Combine(_folder, "logs"), [], [], null).Sweep(Now);
        Assert.True(File.Exists(only));
    }

    private sealed class FailingLoop : BackgroundService
    {
        protected override async Task ExecuteAsync(CancellationToken stoppingToken)
        {
            await Task.Yield();
            throw new InvalidOperationException("disk gone");
        }
    }

    private sealed class QuietLoop(IHostApplicationLifetime lifetime) : BackgroundService
    {
        protected override Task ExecuteAsync(CancellationToken stoppingToken)
        {
            lifetime.StopApplication();
            return Task.CompletedTask;
        }
    }

    [Fact]
    public async Task CodeFor_LoopThrows_ExitsFatalNotZero()
    {
        var builder = Microsoft.Extensions.Hosting.Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { DisableDefaults = true });
        builder.Services.Configure<HostOptions>(o => o.BackgroundServiceExceptionBehavior = BackgroundServiceExceptionBehavior.StopHost);
        builder.Services.AddHostedService<FailingLoop>();
        using var host = builder.Build();
        var loops = HostExit.LoopsOf(host);
        await host.RunAsync();
        Assert.Equal(ExitCodes.Fatal, HostExit.CodeFor(loops));
        Assert.Equal("disk gone", HostExit.FirstFault(loops)?.Message);
    }

    [Fact]
    public async Task CodeFor_CleanStop_ExitsZero()
    {
        var builder = Microsoft.Extensions.Hosting.Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { DisableDefaults = true });
        builder.Services.AddHostedService<QuietLoop>();
        using var host = builder.Build();
        var loops = HostExit.LoopsOf(host);
        await host.RunAsync();
        Assert.Equal(ExitCodes.Ok, HostExit.CodeFor(loops));
        Assert.Equal(ExitCodes.Fatal, HostExit.CodeFor(loops, new InvalidOperationException("reported")));
    }
}
