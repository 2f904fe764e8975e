using System.Diagnostics;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// The shared ledger's server stopped for 30 s while two real nodes work: they stay up, pause
/// intake, report unhealthy, publish nothing they cannot record, and finish every set once the
/// server is back. Uses a private throwaway cluster (<c>.ci/pg-cluster.sh</c>), so stopping it
/// disturbs no other test.
/// </summary>
[Collection(nameof(MultiNodeTests))]
public class LedgerOutageTests(ITestOutputHelper output)
{
    private const int Sets = 12, PerSet = 12;
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(5);

    [Fact]
    public void Watch_DatabaseStoppedThirtySeconds_NodesStayUpReportUnhealthyThenFinishEverything()
    {
        if (TestPostgres.ConnectionStringOrSkip(output.WriteLine) is null)
        {
            return; // no PostgreSQL here (outside CI): the private cluster needs the same server
        }
        using var dir = new ScratchFolder();
        string data = dir.Sub("pg/db");
        string conn = Cluster("start", data);
        try
        {
            Directory.CreateDirectory(dir.Sub("in"));
            using var cluster = new NodeCluster(dir.Path, dir.Sub("in"), dir.Sub("out"), conn, leaseSeconds: 4,
                "--Seamwright:Operations:HeartbeatSeconds=1");
            cluster.Start("n1");
            cluster.Start("n2");
            cluster.WaitRegistered("n1", Limit);
            cluster.WaitRegistered("n2", Limit);
            NodeCluster.DropSets(dir.Sub("in"), Sets, PerSet, seedBase: 50_000);
            var inputs = TestImages.Hashes(dir.Sub("in")).Where(kv => !kv.Key.StartsWith(".seamwright", StringComparison.Ordinal)).ToDictionary();
            cluster.WaitUntil(st => st.Sets().Count(s => s.State == SetStates.Done) >= 2, Limit, "two sets done before the outage");
            int doneBefore = cluster.Read(st => st.Sets().Count(s => s.State == SetStates.Done));

            Cluster("stop", data);
            var outage = Stopwatch.StartNew();
            while (outage.Elapsed < TimeSpan.FromSeconds(30))
            {
                foreach (var (node, p) in cluster.Nodes)
                {
                    Assert.False(p.HasExited, $"node {node} exited ({(p.HasExited ? p.ExitCode : 0)}) during the outage:\n{p.Output}\n{p.Errors}");
                }
                Thread.Sleep(1000);
            }
            foreach (var (node, p) in cluster.Nodes)
            {
                string log = p.Output + p.Errors;
                Assert.True(log.Contains("shared ledger is unreachable", StringComparison.Ordinal), $"node {node} did not notice the outage:\n{log}");
                Assert.True(log.Contains("Service unhealthy", StringComparison.Ordinal), $"node {node} did not report itself unhealthy:\n{log}");
            }
            Cluster("start", data);
            var back = Stopwatch.StartNew();

            cluster.WaitUntil(st => st.Sets().Count(s => s.State == SetStates.Done) == Sets && st.Sets().Count == Sets, Limit, "every set done after the outage");
            double recovery = back.Elapsed.TotalSeconds;
            foreach (var (node, p) in cluster.Nodes)
            {
                Assert.Contains("answers again", p.Output + p.Errors, StringComparison.Ordinal);
            }
            cluster.StopAll();
            var records = NodeCluster.CheckComplete(dir.Sub("out"), Sets, PerSet);
            var runs = cluster.Read(st => st.Runs());
            Assert.DoesNotContain(runs, r => r.State == "running");
            Assert.Equal(inputs, TestImages.Hashes(dir.Sub("in")).Where(kv => !kv.Key.StartsWith(".seamwright", StringComparison.Ordinal)).ToDictionary());
            output.WriteLine($"outage: {Sets} sets x {PerSet} images on 2 nodes; {doneBefore} done when the server stopped for 30 s; both nodes stayed up, " +
                $"reported the ledger unreachable and themselves unhealthy; all done {recovery:0.0} s after it returned; runs {runs.Count} " +
                $"({runs.Count(r => r.State == "abandoned")} abandoned, {runs.Count(r => r.State == "done")} done); confidence records {records.Count}; duplicates 0; sets lost 0");
        }
        finally
        {
            Cluster("stop", data, check: false);
        }
    }

    /// <summary>Runs <c>.ci/pg-cluster.sh</c>; returns what it printed (the connection string for "start").</summary>
    private static string Cluster(string command, string data, bool check = true)
    {
        var psi = new ProcessStartInfo("bash") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add(Path.Combine(RepoPaths.Root, ".ci", "pg-cluster.sh"));
        psi.ArgumentList.Add(command);
        psi.ArgumentList.Add(data);
        using var p = Process.Start(psi)!;
        string stdout = p.StandardOutput.ReadToEnd();
        string stderr = p.StandardError.ReadToEnd();
        p.WaitForExit();
        if (check)
        {
            Assert.True(p.ExitCode == 0, $"pg-cluster.sh {command} failed ({p.ExitCode}): {stderr}");
        }
        return stdout.Trim();
    }
}
