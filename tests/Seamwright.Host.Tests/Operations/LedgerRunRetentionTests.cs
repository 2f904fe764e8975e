using Microsoft.Data.Sqlite;
using Seamwright.Host.Operations;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Host.Tests.Operations;

public sealed class LedgerRunRetentionTests : IDisposable
{
    private readonly string _root = Directory.CreateTempSubdirectory("sw-runretention-").FullName;

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        Directory.Delete(_root, true);
    }

    private static ConfidenceRecord Record(long run, string set) => new()
    {
        Kind = "pair", Run = run, Time = "2026-12-01T00:00:00.000Z", Set = set, ImageA = "a.png", ImageB = "b.png", Status = "accepted", InlierCount = 40, MatchCount = 50,
        Homography = [[1, 0, 3], [0, 1, 0], [0, 0, 1]], MotionModel = "homography", FeaturePath = "corners", CornerSigmaPx = 0.5, RmsResidualPx = 0.4,
        Consensus = null, Seed = "1", Reasons = [], TimingsMs = new ConfidenceTimings(0, 0, 0, 0, 0), SettingsFingerprint = "fp",
    };

    private long FinishedRun(StateStore store, ConfidenceLog log, string set)
    {
        long run = store.BeginRun(set, "default", "fp", "1.0.0");
        store.FinishRun(run, set, "fp", "in" + run, new RunSummary(2, 0, 1, 1, 0, 0, false),
            [new PairResultRecord("a.png", "b.png", "accepted", 40, 50, "")], [new FileOutcome("a.png", 1, 1, "h", true, null)]);
        store.RecordFailure(run, set, "c.png", "unreadable");
        log.Append([Record(run, set)]);
        return run;
    }

    private void Age(long run, int days)
    {
        using var db = new SqliteConnection("Data Source=" + Path.Combine(_root, StateStore.StateFolder, StateStore.DatabaseName));
        db.Open();
        using var cmd = db.CreateCommand();
        cmd.CommandText = "UPDATE runs SET started=$t WHERE run_id=$r";
        cmd.Parameters.AddWithValue("$t", DateTime.UtcNow.AddDays(-days).Ticks);
        cmd.Parameters.AddWithValue("$r", run);
        cmd.ExecuteNonQuery();
    }

    [Fact]
    public void Sweep_SeveralRunsOfASet_OldRowsAndRecordsGoneNewestOutputsKept()
    {
        using var store = StateStore.Open(_root);
        var log = new ConfidenceLog(_root);
        var runs = Enumerable.Range(0, 5).Select(_ => FinishedRun(store, log, "s1")).ToList();
        long other = FinishedRun(store, log, "s2");
        for (int i = 0; i < runs.Count; i++)
        {
            Age(runs[i], 100 - (i * 20)); // 100, 80, 60, 40, 20 days old
        }
        Age(other, 100); // the only run of s2, old but current: its rows stay, its log records go
        string setFolder = OutputLayout.SetFolder(_root, "s1");
        Directory.CreateDirectory(setFolder);
        string manifest = Path.Combine(setFolder, OutputLayout.ManifestName);
        string sidecar = Path.Combine(setFolder, "a.png" + OutputLayout.SidecarSuffix);
        File.WriteAllText(manifest, "{\"files\":[\"a.png.seam.json\"]}");
        File.WriteAllText(sidecar, "{}");
        byte[] manifestBefore = File.ReadAllBytes(manifest);
        var ctx = new ProcessingContext
        {
            OutputRoot = _root, Options = new SeamwrightOptions(), Store = store, Log = log, Engine = new ChecksumEngine(),
            Cache = new FeatureCache(_root, new ChecksumEngine()), Budget = new MemoryBudget(1 << 20), JobSlots = new SemaphoreSlim(1),
        };
        var retention = new LedgerRunRetention([ctx]);
        var sweeper = new RetentionSweeper(new OperationsOptions { ConfidenceLogRetentionDays = 50, KeepOldRuns = 1 }, null, [],
            retention.ConfidenceLogs, retention);

        var notes = sweeper.Sweep(DateTimeOffset.UtcNow);

        // Ledger: s1 keeps its newest run and one older one; s2 keeps its only (current) run.
        Assert.Equal(new[] { runs[3], runs[4] }, store.Runs("s1").Select(r => r.RunId));
        Assert.Equal(new[] { other }, store.Runs("s2").Select(r => r.RunId));
        Assert.Empty(store.PairResults(runs[0]));
        Assert.Single(store.PairResults(runs[4]));
        Assert.DoesNotContain(store.Failures("s1"), f => f.RunId < runs[3]);
        Assert.Equal(runs[4], store.GetSet("s1")!.DoneRun);
        // Confidence log: records of runs started more than 50 days ago are gone; every line still parses.
        var left = ConfidenceLog.ReadAll(log.Path);
        Assert.Equal(new[] { runs[3], runs[4] }, left.Select(r => r.Run).Order());
        Assert.All(File.ReadAllLines(log.Path), l => Assert.NotNull(OutputJson.ReadConfidenceLine(l)));
        // The newest run's outputs and manifest are untouched.
        Assert.Equal(manifestBefore, File.ReadAllBytes(manifest));
        Assert.True(File.Exists(sidecar));
        Assert.Contains(notes, n => n.Contains("3 superseded runs of set s1", StringComparison.Ordinal));
        // Appends after the rewrite land in the same, whole log.
        log.Append([Record(runs[4], "s1")]);
        Assert.Equal(3, ConfidenceLog.ReadAll(log.Path).Count);
    }
}
