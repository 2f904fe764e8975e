using System.Collections.Concurrent;
using Seamwright.Host.Supervision;
using Seamwright.Pipeline.Quarantine;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Supervision;

/// <summary>
/// The real `seamwright worker` processes under the supervisor, fed hostile inputs. No timing is
/// asserted: the limits are only the mechanism that turns a hang into a reason.
/// </summary>
public sealed class SupervisedDecodeTests(ITestOutputHelper output) : IDisposable
{
    private readonly string _folder = WorkerTestSupport.TempFolder("sw-decode-");

    private static SupervisionOptions Options(double timeoutSeconds = 8, int strikes = 2) => new()
    {
        Workers = 2,
        JobTimeoutSeconds = timeoutSeconds,
        MemoryCapMegabytes = 256,
        MaxMegapixels = 40,
        StrikesBeforeQuarantine = strikes,
        MemoryPollMilliseconds = 50,
    };

    public void Dispose() => Directory.Delete(_folder, true);

    private string Write(string name, byte[] bytes)
    {
        string path = Path.Combine(_folder, name);
        File.WriteAllBytes(path, bytes);
        return path;
    }

    [Fact]
    public async Task DecodeAsync_CraftedAndMutatedInputs_EachEndsWithReasonGoodFilesFlowFatalFileQuarantined()
    {
        var valid = CraftedFiles.ValidSmallImages(64);
        var tiny = CraftedFiles.ValidSmallImages(24);
        byte[] jpeg = valid.Single(v => v.Extension == ".jpg").Bytes;
        var crafted = new Dictionary<string, string>
        {
            ["bigtiff-entries.tif"] = Write("bigtiff-entries.tif", CraftedFiles.BigTiffHugeEntryCount()),
            ["bmp-offset.bmp"] = Write("bmp-offset.bmp", CraftedFiles.BmpHugePixelOffset()),
            ["png-60000.png"] = Write("png-60000.png", CraftedFiles.PngClaiming60000Squared()),
            ["truncated.jpg"] = Write("truncated.jpg", CraftedFiles.TruncatedJpeg(jpeg)),
            ["corrupt.jpg"] = Write("corrupt.jpg", CraftedFiles.CorruptJpeg(jpeg)),
            ["text.png"] = Write("text.png", CraftedFiles.TextNamedPng()),
        };
        var good = new List<string>();
        for (int i = 0; i < 20; i++)
        {
            var (ext, bytes) = valid[i % valid.Count];
            good.Add(Write($"good-{i:D2}{ext}", bytes));
        }
        var random = new Random(20261201); // seeded: the same 1,000 mutations every run
        var mutated = new List<string>();
        for (int i = 0; i < 1000; i++)
        {
            var (ext, bytes) = tiny[i % tiny.Count];
            mutated.Add(Write($"mutated-{i:D4}{ext}", CraftedFiles.Mutate(bytes, random)));
        }
        string fatal = Write("fatal.png", valid[0].Bytes);

        var options = Options();
        var ledger = new InMemoryQuarantineLedger();
        await using var pool = new WorkerPool(WorkerTestSupport.Launch, options, WorkerTestSupport.Faults("crash:fatal.png"));
        var supervisor = new DecodeSupervisor(pool, ledger, options, TimeProvider.System);

        // Good files interleaved with the hostile ones, so "good files keep flowing" is tested
        // while workers are being killed.
        var all = crafted.Values.Concat(mutated).Append(fatal).ToList();
        for (int i = 0; i < good.Count; i++)
        {
            all.Insert(i * all.Count / good.Count, good[i]);
        }
        var outcomes = new ConcurrentDictionary<string, DecodeOutcome>();
        await Parallel.ForEachAsync(all, new ParallelOptions { MaxDegreeOfParallelism = options.Workers }, async (path, ct) =>
            outcomes[path] = await supervisor.DecodeAsync(path, ct));

        Assert.Equal(all.Count, outcomes.Count);
        Assert.All(outcomes, o => Assert.True(
            o.Value.Status == DecodeStatus.Decoded || !string.IsNullOrWhiteSpace(o.Value.Reason),
            $"{Path.GetFileName(o.Key)} ended {o.Value.Status} without a reason"));
        Assert.All(good, g => Assert.True(outcomes[g].Status == DecodeStatus.Decoded, $"{Path.GetFileName(g)}: {outcomes[g].Reason}"));
        Assert.All(good, g => Assert.Equal(64, outcomes[g].Reply!.Width));

        Assert.Equal(DecodeStatus.Quarantined, outcomes[fatal].Status);
        Assert.Equal(options.StrikesBeforeQuarantine, outcomes[fatal].Attempts);
        Assert.Contains("signal 6", outcomes[fatal].Reason, StringComparison.Ordinal);
        var again = await supervisor.DecodeAsync(fatal, CancellationToken.None);
        Assert.Equal((DecodeStatus.Quarantined, 0), (again.Status, again.Attempts));

        Assert.Equal(DecodeStatus.Rejected, outcomes[crafted["text.png"]].Status);
        Assert.Equal("UnknownFormat", outcomes[crafted["text.png"]].Reply!.FailureKind);
        Assert.Equal(DecodeStatus.Rejected, outcomes[crafted["png-60000.png"]].Status);
        Assert.Equal("TooManyPixels", outcomes[crafted["png-60000.png"]].Reply!.FailureKind);
        foreach (string name in new[] { "bigtiff-entries.tif", "bmp-offset.bmp", "truncated.jpg", "corrupt.jpg" })
        {
            Assert.NotEqual(DecodeStatus.Decoded, outcomes[crafted[name]].Status);
        }

        var counters = pool.Counters;
        Assert.True(counters.PeakWorkerBytes <= options.MemoryCapBytes, $"peak worker memory {counters.PeakWorkerBytes >> 20} MiB over the cap");
        Assert.True(counters.Kills >= options.StrikesBeforeQuarantine);

        // Figures for the closing note.
        output.WriteLine($"worker limits: {pool.LastWorkerLimits}");
        output.WriteLine($"files: {all.Count} ({crafted.Count} crafted, {mutated.Count} mutated, {good.Count} good, 1 fatal)");
        output.WriteLine($"decoded: {outcomes.Values.Count(o => o.Status == DecodeStatus.Decoded)}, rejected: {outcomes.Values.Count(o => o.Status == DecodeStatus.Rejected)}, quarantined: {outcomes.Values.Count(o => o.Status == DecodeStatus.Quarantined)}");
        output.WriteLine($"mutated decoded anyway: {mutated.Count(m => outcomes[m].Status == DecodeStatus.Decoded)}");
        output.WriteLine($"jobs: {counters.Jobs}, workers started: {counters.WorkersStarted}, kills: {counters.Kills} (crashes {counters.Crashes}, time-outs {counters.Timeouts}, memory {counters.MemoryKills}), quarantines: {supervisor.Quarantines}");
        output.WriteLine($"peak worker working set: {counters.PeakWorkerBytes / (1 << 20)} MiB (cap {options.MemoryCapMegabytes} MiB); supervisor peak: {Environment.WorkingSet >> 20} MiB now");
        foreach (var (name, path) in crafted)
        {
            output.WriteLine($"{name}: {outcomes[path].Status}: {outcomes[path].Reason}");
        }
        foreach (var reason in outcomes.Values.Where(o => o.Reason is not null).GroupBy(o => Head(o.Reason!)).OrderByDescending(g => g.Count()))
        {
            output.WriteLine($"  {reason.Count(),4} x {reason.Key}");
        }
    }

    [Fact]
    public async Task DecodeAsync_HangingFile_KilledAtLimitQuarantinedAndNextFileDecoded()
    {
        var valid = CraftedFiles.ValidSmallImages();
        string hang = Write("hang.png", valid[0].Bytes);
        string next = Write("next.png", valid[0].Bytes);
        var options = Options(timeoutSeconds: 2);
        await using var pool = new WorkerPool(WorkerTestSupport.Launch, options, WorkerTestSupport.Faults("hang:hang.png"));
        var supervisor = new DecodeSupervisor(pool, new InMemoryQuarantineLedger(), options, TimeProvider.System);

        var outcome = await supervisor.DecodeAsync(hang, CancellationToken.None);

        Assert.Equal(DecodeStatus.Quarantined, outcome.Status);
        Assert.Contains("limit", outcome.Reason, StringComparison.Ordinal);
        Assert.Equal(2, pool.Counters.Timeouts);
        Assert.Equal(DecodeStatus.Decoded, (await supervisor.DecodeAsync(next, CancellationToken.None)).Status);
    }

    [Fact]
    public async Task DecodeAsync_GrowingFile_StoppedUnderCapAndWorkerReplaced()
    {
        var valid = CraftedFiles.ValidSmallImages();
        string grow = Write("grow.png", valid[0].Bytes);
        string next = Write("next.png", valid[0].Bytes);
        var options = Options();
        await using var pool = new WorkerPool(WorkerTestSupport.Launch, options, WorkerTestSupport.Faults("grow:grow.png"));
        var supervisor = new DecodeSupervisor(pool, new InMemoryQuarantineLedger(), options, TimeProvider.System);

        var outcome = await supervisor.DecodeAsync(grow, CancellationToken.None);
        output.WriteLine($"{outcome.Status}: {outcome.Reason}; peak {pool.Counters.PeakWorkerBytes >> 20} MiB; limits {pool.LastWorkerLimits}");

        Assert.NotEqual(DecodeStatus.Decoded, outcome.Status);
        Assert.Contains("memory", outcome.Reason, StringComparison.OrdinalIgnoreCase);
        // A worker allocating as fast as it can is sampled, not stopped at the byte: it may pass
        // the cap by what it allocates in one poll interval, and the address-space limit bounds
        // that overshoot absolutely.
        Assert.True(pool.Counters.PeakWorkerBytes <= options.MemoryCapBytes + LinuxAddressSpaceLimit.ReservationSlackBytes,
            $"peak {pool.Counters.PeakWorkerBytes >> 20} MiB");
        Assert.Equal(DecodeStatus.Decoded, (await supervisor.DecodeAsync(next, CancellationToken.None)).Status);
        Assert.True(pool.Counters.WorkersStarted >= 2, "the worker that ran out of memory was replaced");
    }

    [Fact]
    public async Task DecodeAsync_FeatureOutputPath_WorkerWritesReadableFeatureCacheFile()
    {
        string image = Write("scene.png", CraftedFiles.ValidSmallImages(96)[0].Bytes);
        string cache = Path.Combine(_folder, "cache", "scene.features");
        Directory.CreateDirectory(Path.GetDirectoryName(cache)!);
        var options = Options();
        await using var pool = new WorkerPool(WorkerTestSupport.Launch, options);
        var supervisor = new DecodeSupervisor(pool, new InMemoryQuarantineLedger(), options, TimeProvider.System);

        var outcome = await supervisor.DecodeAsync(image, CancellationToken.None, cache);

        Assert.Equal(DecodeStatus.Decoded, outcome.Status);
        using var stream = File.OpenRead(cache);
        var features = Seamwright.Pipeline.Features.FeatureCacheCodec.Read(stream);
        Assert.Equal(outcome.Reply!.FeatureCount, features.Count);
        Assert.Equal(96, features.FullSize.Width);
        Assert.True(features.Count > 0, "a textured 96 x 96 image has corners");
    }

    [Fact]
    public async Task DecodeAsync_Cancelled_NoStrikeAndWorkersGone()
    {
        var valid = CraftedFiles.ValidSmallImages();
        string hang = Write("hang.png", valid[0].Bytes);
        var options = Options(timeoutSeconds: 600);
        var ledger = new InMemoryQuarantineLedger();
        var pool = new WorkerPool(WorkerTestSupport.Launch, options, WorkerTestSupport.Faults("hang:hang.png"));
        var supervisor = new DecodeSupervisor(pool, ledger, options, TimeProvider.System);
        using var stop = new CancellationTokenSource();

        var decode = supervisor.DecodeAsync(hang, stop.Token);
        while (pool.Counters.Jobs == 0)
        {
            await Task.Delay(20);
        }
        await stop.CancelAsync();
        await Assert.ThrowsAnyAsync<OperationCanceledException>(() => decode);
        await pool.DisposeAsync();

        Assert.Equal(0, pool.Counters.Kills);
        Assert.Empty(ledger.TakeInterrupted());
        Assert.Equal(1, ledger.AddStrike(FileIdentity.Of(hang), "probe", DateTimeOffset.UnixEpoch));
    }

    private static string Head(string reason)
    {
        int cut = reason.IndexOfAny([':', '(']);
        return cut > 0 ? reason[..cut] : reason;
    }
}
