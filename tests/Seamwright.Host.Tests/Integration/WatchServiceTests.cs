using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;

namespace Seamwright.Host.Tests.Integration;

/// <summary>The service (<c>seamwright watch</c>) as the real process, fed while it runs.</summary>
public class WatchServiceTests
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(4);

    private static SeamwrightProcess Watch(ScratchFolder dir, params string[] extra) =>
        SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings, .. extra]);

    [Fact]
    public void Watch_BurstOf2000FilesAcrossSets_EachFileProcessedExactlyOnce()
    {
        const int Sets = 40, PerSet = 50;
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        var images = Enumerable.Range(0, Sets * PerSet).Select(i => TestImages.Png(i)).ToArray(); // all distinct, so every file must be decoded once
        using var service = Watch(dir, "--Seamwright:Profiles:default:Completion:QuietSeconds=3", "--Seamwright:Service:MaxParallelJobs=2");
        Ledger.WaitUntil(dir.Sub("out"), _ => true, TimeSpan.FromSeconds(60), "the service to start", service);

        var sw = System.Diagnostics.Stopwatch.StartNew();
        for (int s = 0; s < Sets; s++)
        {
            string folder = dir.Sub($"in/batch{s:D2}");
            Directory.CreateDirectory(folder);
            for (int i = 0; i < PerSet; i++)
            {
                string target = Path.Combine(folder, $"tile{i:D3}.png");
                byte[] bytes = images[s * PerSet + i];
                if (i % 2 == 0)
                {
                    File.WriteAllBytes(target, bytes);
                }
                else
                {
                    File.WriteAllBytes(target + ".part", bytes); // write-then-rename producer
                    File.Move(target + ".part", target);
                }
            }
        }
        double dropSeconds = sw.Elapsed.TotalSeconds;

        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Count(x => x.State == SetStates.Done) == Sets, Limit, "every set done", service);
        double doneSeconds = sw.Elapsed.TotalSeconds;
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        Assert.Equal(0, service.ExitCode);

        var (files, runs) = Ledger.Read(dir.Sub("out"), st => (st.Files(), st.Runs()));
        Assert.Equal(Sets * PerSet, files.Count);
        Assert.All(files, f => Assert.Equal("analysed", f.State));
        int decodes = files.Sum(f => f.Analyses);
        Assert.All(files, f => Assert.Equal(1, f.Analyses));
        Assert.Equal(Sets, runs.Count);
        Assert.All(runs, r => Assert.Equal("done", r.State));
        int sidecars = 0, duplicates = 0;
        for (int s = 0; s < Sets; s++)
        {
            var m = OutputChecks.ManifestIsComplete(dir.Sub($"out/batch{s:D2}"));
            Assert.Equal(PerSet, m.Images.Length);
            sidecars += m.Files.Count(f => f.Kind == "sidecar");
            duplicates += m.Images.Length - m.Images.Distinct().Count();
        }
        Assert.Equal(Sets * PerSet, sidecars);
        Assert.Equal(0, duplicates);
        var records = ConfidenceLog.ReadAll(dir.Sub("out/confidence.jsonl"));
        Assert.Equal(Sets * (PerSet - 1 + PerSet - 2), records.Count);
        Assert.Equal(records.Count, records.Select(r => (r.Set, r.ImageA, r.ImageB)).Distinct().Count());
        Console.WriteLine($"burst: {Sets * PerSet} files in {Sets} sets dropped in {dropSeconds:0.0} s, all done {doneSeconds:0.0} s after the first; " +
            $"runs {runs.Count}, decodes {decodes}, sidecars {sidecars}, duplicates {duplicates}, losses {Sets * PerSet - sidecars}");
    }

    [Fact]
    public void Watch_SlowWriter_FileNotDecodedBeforeItIsComplete()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/slow"), 2, 1);
        byte[] large = TestImages.Png(77, 1400, 1400); // about 2 MB of noisy blocks
        using var service = Watch(dir, "--Seamwright:Service:StableSeconds=3", "--Seamwright:Profiles:default:Completion:QuietSeconds=1");
        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Any(s => s.State == SetStates.Done), Limit, "the first two images", service);
        long runsBefore = Ledger.Read(dir.Sub("out"), st => st.Runs().Count);

        DateTime finished;
        using (var fs = new FileStream(dir.Sub("in/slow/big.png"), FileMode.CreateNew, FileAccess.Write, FileShare.Read))
        {
            int chunk = large.Length / 12;
            for (int off = 0; off < large.Length; off += chunk)
            {
                fs.Write(large, off, Math.Min(chunk, large.Length - off));
                fs.Flush();
                Thread.Sleep(400); // 12 pauses of 0.4 s: about 5 s of writing, each pause far shorter than the 3 s stability period
            }
            finished = DateTime.UtcNow;
        }

        Ledger.WaitUntil(dir.Sub("out"), st => st.Files().Any(f => f.Path == "slow/big.png" && f.State != "seen"), Limit, "the large file processed", service);
        var (file, runs) = Ledger.Read(dir.Sub("out"), st => (st.Files().Single(f => f.Path == "slow/big.png"), st.Runs()));
        Assert.Equal("analysed", file.State);
        Assert.Equal(large.Length, file.Size);
        Assert.Equal(1, file.Analyses);
        var later = runs.Skip((int)runsBefore).ToList();
        Assert.Single(later);
        Assert.True(later[0].StartedUtc > finished, $"run started {later[0].StartedUtc:O}, writer finished {finished:O}");
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
    }

    [Fact]
    public void Watch_LateReplacedRemovedAndBrokenFiles_SetGoesStaleAndIsRedoneServiceKeepsRunning()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 4, 1);
        using var service = Watch(dir);
        string setOut = dir.Sub("out/s");
        long Run() => OutputJson.ReadManifest(Path.Combine(setOut, OutputLayout.ManifestName)).Run;
        bool DoneAfter(StateStore st, long run) => st.GetSet("s") is { State: SetStates.Done, DoneRun: long r } && r > run;

        Ledger.WaitUntil(dir.Sub("out"), st => DoneAfter(st, 0), Limit, "first run", service);
        long first = Run();

        File.WriteAllBytes(dir.Sub("in/s/img005.png"), TestImages.Png(500)); // late
        Ledger.WaitUntil(dir.Sub("out"), st => DoneAfter(st, first), Limit, "redo after a late file", service);
        long second = Run();
        Assert.Contains("img005.png", OutputChecks.ManifestIsComplete(setOut).Images);

        File.WriteAllBytes(dir.Sub("in/s/img002.png"), TestImages.Png(600)); // replaced
        Ledger.WaitUntil(dir.Sub("out"), st => DoneAfter(st, second), Limit, "redo after a replaced file", service);
        long third = Run();
        string newHash = Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(File.ReadAllBytes(dir.Sub("in/s/img002.png"))));
        Assert.Equal(newHash, OutputJson.ReadSidecar(Path.Combine(setOut, "img002.png.seam.json")).Sha256);

        File.Delete(dir.Sub("in/s/img003.png")); // removed
        File.WriteAllText(dir.Sub("in/s/broken.jpg"), "not a jpeg"); // and a broken file at the same time
        var inputs = TestImages.Hashes(dir.Sub("in"));
        Ledger.WaitUntil(dir.Sub("out"), st => DoneAfter(st, third), Limit, "redo after a removal", service);
        var m = OutputChecks.ManifestIsComplete(setOut);
        Assert.DoesNotContain("img003.png", m.Images);
        Assert.False(File.Exists(Path.Combine(setOut, "img003.png.seam.json")));
        Assert.Equal("broken.jpg", Assert.Single(m.Skipped).Image);
        Assert.Equal(inputs, TestImages.Hashes(dir.Sub("in")));

        // Still alive and serving: a new set after the broken file.
        TestImages.WriteSet(dir.Sub("in/next"), 2, 40);
        Ledger.WaitUntil(dir.Sub("out"), st => st.GetSet("next")?.State == SetStates.Done, Limit, "a new set after the broken file", service);
        var states = Ledger.Read(dir.Sub("out"), st => st.Runs("s").Select(r => r.State).ToArray());
        Assert.Equal(4, states.Count(x => x == "done"));
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        Assert.Equal(0, service.ExitCode);
    }

    [Fact]
    public void Watch_RootMissing_ExitsTwoAsAStartUpError()
    {
        using var dir = new ScratchFolder();
        var (code, _, stderr) = SeamwrightProcess.Run(dir.Path, Limit, ["watch", dir.Sub("absent"), "--output", dir.Sub("out"), "--Seamwright:Engine=checksum"]);
        Assert.Equal(ExitCodes.BadArguments, code); // a start-up error, not fatal: a restart would not help
        Assert.Contains("does not exist", stderr, StringComparison.Ordinal);
    }
}
