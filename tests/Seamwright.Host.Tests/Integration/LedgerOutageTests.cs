using System.Diagnostics;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// The shared ledger's server stopped for 30 s while two real nodes work: they stay up, pause
/// intake, report unhealthy (the log, and /health 503 naming the unreachable ledger while /metrics
/// keeps the nodes last read), publish nothing they cannot record, and finish every set once the
/// server is back (/health 200 again). Uses a private throwaway cluster (<c>.ci/pg-cluster.sh</c>), so stopping it
/// disturbs no other test.
/// </summary>
[Collection(nameof(MultiNodeTests))]
public class LedgerOutageTests(ITestOutputHelper output)
{
    private const int Sets = 12, PerSet = 12;
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(5);

    private static int FreePort()
    {
        using var l = new System.Net.Sockets.TcpListener(System.Net.IPAddress.Loopback, 0);
        l.Start();
        return ((System.Net.IPEndPoint)l.LocalEndpoint).Port;
    }

    /// <summary>GET of a node's endpoint: the status and body, or (0, the error) when it does not answer.</summary>
    private static async Task<(int Status, string Body)> Get(HttpClient http, int port, string path)
    {
        try
        {
            using var response = await http.GetAsync(new Uri($"http://127.0.0.1:{port}{path}"));
            return ((int)response.StatusCode, await response.Content.ReadAsStringAsync());
        }
        catch (Exception e) when (e is HttpRequestException or TaskCanceledException)
        {
            return (0, e.Message);
        }
    }

    [Fact]
    public async Task Watch_DatabaseStoppedThirtySeconds_NodesStayUpReportUnhealthyThenFinishEverything()
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
            var ports = new Dictionary<string, int> { ["n1"] = FreePort(), ["n2"] = FreePort() };
            foreach (var (node, port) in ports)
            {
                cluster.Start(node, $"--Seamwright:Operations:HttpListen=127.0.0.1:{port}");
            }
            using var http = new HttpClient { Timeout = TimeSpan.FromSeconds(10) };
            cluster.WaitRegistered("n1", Limit);
            cluster.WaitRegistered("n2", Limit);
            NodeCluster.DropSets(dir.Sub("in"), Sets, PerSet, seedBase: 50_000);
            var inputs = TestImages.Hashes(dir.Sub("in")).Where(kv => !kv.Key.StartsWith(".seamwright", StringComparison.Ordinal)).ToDictionary();
            cluster.WaitUntil(st => st.Sets().Count(s => s.State == SetStates.Done) >= 2, Limit, "two sets done before the outage");
            int doneBefore = cluster.Read(st => st.Sets().Count(s => s.State == SetStates.Done));

            Cluster("stop", data);
            var outage = Stopwatch.StartNew();
            // Each node's /health during the outage (the first 503 it gave) and its last /metrics of the outage.
            var unhealthy = new Dictionary<string, string>();
            var metricsDuring = new Dictionary<string, string>();
            while (outage.Elapsed < TimeSpan.FromSeconds(30))
            {
                foreach (var (node, p) in cluster.Nodes)
                {
                    Assert.False(p.HasExited, $"node {node} exited ({(p.HasExited ? p.ExitCode : 0)}) during the outage:\n{p.Output}\n{p.Errors}");
                    if (!unhealthy.ContainsKey(node) && await Get(http, ports[node], "/health") is (503, var body))
                    {
                        unhealthy[node] = body;
                    }
                    if (unhealthy.ContainsKey(node))
                    {
                        // the gauges follow the health loop's ticks (every second here): keep the latest scrape
                        metricsDuring[node] = (await Get(http, ports[node], "/metrics")).Body;
                    }
                }
                await Task.Delay(1000);
            }
            foreach (var (node, p) in cluster.Nodes)
            {
                string log = p.Output + p.Errors;
                Assert.True(log.Contains("shared ledger is unreachable", StringComparison.Ordinal), $"node {node} did not notice the outage:\n{log}");
                Assert.True(log.Contains("Service unhealthy", StringComparison.Ordinal), $"node {node} did not report itself unhealthy:\n{log}");
                Assert.True(unhealthy.TryGetValue(node, out string? health), $"node {node}'s /health never answered 503 during the outage");
                Assert.Contains("the shared ledger is unreachable", health, StringComparison.Ordinal);
                Assert.Equal("unhealthy", System.Text.Json.JsonDocument.Parse(health).RootElement.GetProperty("status").GetString());
                // The metrics answer from what was read before: both nodes still listed, healthy 0.
                Assert.Equal(0, PrometheusText.Value(metricsDuring[node], "seamwright_healthy"));
                Assert.NotNull(PrometheusText.Value(metricsDuring[node], "seamwright_node_last_heartbeat_timestamp_seconds", ("node", "n1")));
                Assert.NotNull(PrometheusText.Value(metricsDuring[node], "seamwright_node_last_heartbeat_timestamp_seconds", ("node", "n2")));
            }
            Cluster("start", data);
            var back = Stopwatch.StartNew();

            cluster.WaitUntil(st => st.Sets().Count(s => s.State == SetStates.Done) == Sets && st.Sets().Count == Sets, Limit, "every set done after the outage");
            double recovery = back.Elapsed.TotalSeconds;
            foreach (var (node, p) in cluster.Nodes)
            {
                Assert.Contains("answers again", p.Output + p.Errors, StringComparison.Ordinal);
                var healthyAgain = Stopwatch.StartNew();
                while ((await Get(http, ports[node], "/health")).Status != 200 && healthyAgain.Elapsed < Limit)
                {
                    await Task.Delay(500);
                }
                Assert.True((await Get(http, ports[node], "/health")).Status == 200, $"node {node}'s /health did not answer 200 after the outage");
            }
            cluster.StopAll();
            var records = NodeCluster.CheckComplete(dir.Sub("out"), Sets, PerSet);
            var runs = cluster.Read(st => st.Runs());
            Assert.DoesNotContain(runs, r => r.State == "running");
            Assert.Equal(inputs, TestImages.Hashes(dir.Sub("in")).Where(kv => !kv.Key.StartsWith(".seamwright", StringComparison.Ordinal)).ToDictionary());
            output.WriteLine($"outage: {Sets} sets x {PerSet} images on 2 nodes; {doneBefore} done when the server stopped for 30 s; both nodes stayed up, " +
                $"reported the ledger unreachable and themselves unhealthy (log, /health 503); all done {recovery:0.0} s after it returned; runs {runs.Count} " +
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
