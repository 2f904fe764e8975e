using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// Kills the real process with SIGKILL at random moments while it writes outputs, again and
/// again, then restarts it: outputs must parse or be absent, temporaries must be swept, the
/// newest manifest of every set must list a complete run, and every input must end processed.
/// </summary>
public class CrashRecoveryTests
{
    private const int Kills = 20;

    [Fact]
    public void Run_KilledAtRandomMomentsTwentyTimes_RestartLeavesConsistentCompleteOutputs()
    {
        const int Sets = 10, PerSet = 60;
        using var dir = new ScratchFolder();
        for (int s = 0; s < Sets; s++)
        {
            TestImages.WriteSet(dir.Sub($"in/roll{s}"), PerSet, s * 100);
        }
        var inputs = TestImages.Hashes(dir.Sub("in"));
        string output = dir.Sub("out");
        string[] baseArgs = ["--output", output, .. SeamwrightProcess.FastSettings];
        // Seeded only so that a failure can be replayed; the moments are not a result.
        var random = new Random(20261201);
        int kills = 0, midRun = 0, attempts = 0, finishedBeforeKill = 0, tornLogLines = 0;
        while (midRun < Kills && attempts < 100)
        {
            attempts++;
            // The first start is a plain run; later ones force a redo of every set, so there is always work to interrupt.
            string[] args = attempts == 1 ? ["run", dir.Sub("in"), .. baseArgs] : ["rerun", dir.Sub("in"), "--force", .. baseArgs];
            using var p = SeamwrightProcess.Start(dir.Path, args);
            Thread.Sleep(random.Next(1000, 3000));
            if (p.HasExited)
            {
                finishedBeforeKill++;
                continue;
            }
            p.Kill();
            kills++;
            // A kill landed in the middle of a set's run when the ledger still shows that run as running.
            if (LedgerShowsARunningRun(output))
            {
                midRun++;
            }
            // Right after a kill, before anything cleans up: every output a reader could open is whole.
            if (Directory.Exists(output))
            {
                OutputChecks.AllOutputsParse(output);
                string log = Path.Combine(output, ConfidenceLog.FileName);
                if (File.Exists(log) && new FileInfo(log).Length > 0 && File.ReadAllBytes(log)[^1] != (byte)'\n')
                {
                    tornLogLines++;
                }
            }
        }
        Assert.True(midRun >= Kills, $"only {midRun} of {kills} kills landed during a set's run in {attempts} attempts");

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(4), ["run", dir.Sub("in"), .. baseArgs]);

        Assert.True(code == 0, $"exit {code}\n{stdout}\n{stderr}");
        Assert.Empty(OutputChecks.Temporaries(output));
        int parsed = OutputChecks.AllOutputsParse(output);
        int losses = 0, duplicates = 0;
        for (int s = 0; s < Sets; s++)
        {
            var m = OutputChecks.ManifestIsComplete(dir.Sub($"out/roll{s}"));
            losses += PerSet - m.Images.Distinct().Count();
            duplicates += m.Images.Length - m.Images.Distinct().Count();
            Assert.Equal(PerSet, m.Files.Count(f => f.Kind == "sidecar"));
        }
        Assert.Equal(0, losses);
        Assert.Equal(0, duplicates);
        var records = ConfidenceLog.ReadAll(Path.Combine(output, ConfidenceLog.FileName)); // parses every line: no torn tail left
        var (runs, sets) = Ledger.Read(output, st => (st.Runs(), st.Sets()));
        Assert.All(sets, s => Assert.Equal(SetStates.Done, s.State));
        Assert.DoesNotContain(runs, r => r.State == "running");
        Assert.Equal(inputs, TestImages.Hashes(dir.Sub("in")));
        Console.WriteLine($"crash: {Sets * PerSet} files in {Sets} sets; {kills} SIGKILLs ({midRun} in the middle of a set's run) in {attempts} starts ({finishedBeforeKill} finished first); " +
            $"torn log tails seen {tornLogLines}; runs {runs.Count} ({runs.Count(r => r.State == "abandoned")} abandoned, {runs.Count(r => r.State == "done")} done); " +
            $"outputs parsed {parsed}; confidence records {records.Count}; duplicates {duplicates}; losses {losses}");
    }

    /// <summary>False also when the kill came before the ledger's first commit (no state yet).</summary>
    private static bool LedgerShowsARunningRun(string output)
    {
        try
        {
            return Ledger.Read(output, st => st.Runs().Any(r => r.State == "running"));
        }
        catch (FileNotFoundException)
        {
            return false;
        }
    }
}
