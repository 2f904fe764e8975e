using System.Net;
using System.Net.Sockets;
using System.Text.Json;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// The monitoring endpoint of the real `seamwright watch` process, read with a real HTTP client on
/// 127.0.0.1 and a free port: Prometheus text at /metrics (the exposition format: "# TYPE name
/// kind" lines and "name{label="value"} number" samples, from the Prometheus documentation,
/// exposition formats, from memory), /health 200 or 503 with a JSON body; the lock of a served
/// output root refuses a second service with one line and exit 2.
/// </summary>
public class MonitoringEndpointTests(ITestOutputHelper output)
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(3);

    private static int FreePort()
    {
        using var l = new TcpListener(IPAddress.Loopback, 0);
        l.Start();
        return ((IPEndPoint)l.LocalEndpoint).Port;
    }

    private static async Task<HttpResponseMessage> GetWhenUp(HttpClient http, string url, SeamwrightProcess service)
    {
        var end = DateTime.UtcNow + Limit;
        while (true)
        {
            try
            {
                return await http.GetAsync(new Uri(url));
            }
            catch (HttpRequestException) when (DateTime.UtcNow < end && !service.HasExited)
            {
                await Task.Delay(250);
            }
        }
    }

    [Fact]
    public async Task Watch_HttpListen_MetricsAndHealthServedSecondServiceRefused()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/shelf"), 3, seedBase: 60);
        int port = FreePort();
        using var service = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings,
            "--Seamwright:Operations:HeartbeatSeconds=1", $"--Seamwright:Operations:HttpListen=127.0.0.1:{port}", "--Seamwright:Service:NodeName=solo"]);
        Ledger.WaitUntil(dir.Sub("out"), st => st.Sets().Any(s => s.State == SetStates.Done), Limit, "the set done", service);
        using var http = new HttpClient { Timeout = TimeSpan.FromSeconds(30) };
        string metrics = "";
        var end = DateTime.UtcNow + TimeSpan.FromSeconds(60);
        do
        {
            using var response = await GetWhenUp(http, $"http://127.0.0.1:{port}/metrics", service);
            Assert.Equal(HttpStatusCode.OK, response.StatusCode);
            Assert.StartsWith("text/plain", response.Content.Headers.ContentType?.MediaType, StringComparison.Ordinal);
            metrics = await response.Content.ReadAsStringAsync();
            await Task.Delay(500);
        }
        while (!metrics.Contains("seamwright_sets_total{outcome=\"done\"} 1", StringComparison.Ordinal) && DateTime.UtcNow < end);
        using var health = await http.GetAsync(new Uri($"http://127.0.0.1:{port}/health"));
        string healthBody = await health.Content.ReadAsStringAsync();
        double idleSets = await NodeGaugeWhen(http, port, "solo", "seamwright_node_sets", v => true);
        double beat = await NodeGaugeWhen(http, port, "solo", "seamwright_node_last_heartbeat_timestamp_seconds", v => true);
        // A run in progress in the SQLite ledger (as a run of this node would be) is a set the node holds.
        using (var store = StateStore.Open(dir.Sub("out")))
        {
            store.BeginRun("elsewhere", "default", "fp", "1", "solo");
        }
        double busySets = await NodeGaugeWhen(http, port, "solo", "seamwright_node_sets", v => v == 1);
        var (secondCode, secondOut, secondErr) = SeamwrightProcess.Run(dir.Path, TimeSpan.FromMinutes(1),
            ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings]);
        output.WriteLine(metrics);
        output.WriteLine(healthBody);
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));

        // The checksum engine accepts every planned pair: 3 images in sequence give 3 pairs.
        Assert.Contains("seamwright_pairs_total{outcome=\"accepted\"} 3", metrics, StringComparison.Ordinal);
        Assert.Contains("seamwright_sets_total{outcome=\"done\"} 1", metrics, StringComparison.Ordinal);
        Assert.Contains("seamwright_arrival_to_output_seconds_count 1", metrics, StringComparison.Ordinal);
        Assert.Contains("seamwright_arrival_to_output_seconds_bucket{le=\"+Inf\"} 1", metrics, StringComparison.Ordinal);
        foreach (string name in new[] { "seamwright_queue_depth", "seamwright_worker_kills_total", "seamwright_quarantined_files",
                     "seamwright_free_disk_bytes", "seamwright_last_heartbeat_timestamp_seconds", "seamwright_healthy", "seamwright_watcher_missed_changes_total" })
        {
            Assert.Contains("# TYPE " + name + " ", metrics, StringComparison.Ordinal);
        }
        Assert.Contains("seamwright_queue_depth 0", metrics, StringComparison.Ordinal);
        Assert.Contains("seamwright_healthy 1", metrics, StringComparison.Ordinal);
        // The one node of a SQLite ledger: this process, its heartbeat the health loop's, no set held once the set is done.
        Assert.Equal(0, idleSets);
        Assert.InRange(beat, DateTimeOffset.UtcNow.ToUnixTimeSeconds() - 300, DateTimeOffset.UtcNow.ToUnixTimeSeconds() + 5);
        Assert.Equal(1, busySets);
        Assert.Equal(HttpStatusCode.OK, health.StatusCode);
        using var doc = JsonDocument.Parse(healthBody);
        Assert.Equal("healthy", doc.RootElement.GetProperty("status").GetString());

        Assert.Equal(ExitCodes.BadArguments, secondCode);
        Assert.Contains("seamwright: cannot start:", secondErr, StringComparison.Ordinal);
        Assert.Single(secondErr.Trim().Split('\n'));
        Assert.DoesNotContain("   at ", secondOut + secondErr, StringComparison.Ordinal);
    }

    /// <summary>Scrapes /metrics until the node's gauge is present and satisfies <paramref name="wanted"/> (30 s at most); returns its last value.</summary>
    private static async Task<double> NodeGaugeWhen(HttpClient http, int port, string node, string gauge, Func<double, bool> wanted)
    {
        var end = DateTime.UtcNow + TimeSpan.FromSeconds(30);
        double? value;
        string text;
        do
        {
            text = await http.GetStringAsync(new Uri($"http://127.0.0.1:{port}/metrics"));
            value = PrometheusText.Value(text, gauge, ("node", node));
            if (value is { } v && wanted(v))
            {
                return v;
            }
            await Task.Delay(250);
        }
        while (DateTime.UtcNow < end);
        Assert.Fail($"{gauge} of node {node} never as wanted (last {value?.ToString(System.Globalization.CultureInfo.InvariantCulture) ?? "absent"}):\n{text}");
        return 0;
    }

    [Fact]
    public async Task Watch_SharedLedger_MetricsListEveryNodeWithItsHeartbeatAndSets()
    {
        string? conn = TestPostgres.ConnectionStringOrSkip(output.WriteLine);
        if (conn is null)
        {
            return;
        }
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        int port = FreePort();
        using var cluster = new NodeCluster(dir.Path, dir.Sub("in"), dir.Sub("out"), conn, leaseSeconds: 4,
            "--Seamwright:Operations:HeartbeatSeconds=1", $"--Seamwright:Operations:HttpListen=127.0.0.1:{port}");
        cluster.Start("n1");
        cluster.WaitRegistered("n1", Limit);
        // A second node as the ledger sees it: registered, beating, holding a claim on one set.
        using (var other = StateStore.Open(dir.Sub("out"), cluster.State))
        {
            other.RegisterNode("n2", 4242);
            Assert.True(other.TryClaim("elsewhere", "n2", 600_000).Claimed);
        }
        using var http = new HttpClient { Timeout = TimeSpan.FromSeconds(30) };
        await GetWhenUp(http, $"http://127.0.0.1:{port}/health", cluster.Nodes["n1"]);
        double otherSets = await NodeGaugeWhen(http, port, "n2", "seamwright_node_sets", v => v == 1);
        double ownSets = await NodeGaugeWhen(http, port, "n1", "seamwright_node_sets", v => true);
        double ownAge = await NodeGaugeWhen(http, port, "n1", "seamwright_node_heartbeat_age_seconds", v => true);
        double ownBeat = await NodeGaugeWhen(http, port, "n1", "seamwright_node_last_heartbeat_timestamp_seconds", v => true);
        var (dbNow, lastBeat) = cluster.Read(st => st.Nodes().Where(n => n.Node == "n1").Select(n => (n.DatabaseNowUtc, n.LastBeatUtc)).Single());
        string metrics = await http.GetStringAsync(new Uri($"http://127.0.0.1:{port}/metrics"));
        output.WriteLine(metrics);
        cluster.StopAll();

        Assert.Equal(1, otherSets);
        Assert.Equal(0, ownSets);
        // The node beats every third of its 4 s lease; the gauge is as old as the last read (one heartbeat).
        Assert.InRange(ownAge, 0, 4);
        double dbBeat = new DateTimeOffset(lastBeat, TimeSpan.Zero).ToUnixTimeMilliseconds() / 1000.0;
        Assert.InRange(ownBeat, dbBeat - 10, dbBeat + 0.001);
        Assert.True(dbNow >= lastBeat);
        Assert.NotNull(PrometheusText.Value(metrics, "seamwright_nodes_read_timestamp_seconds"));
    }

    [Fact]
    public async Task Watch_IntakePausedForDiskSpace_HealthAnswers503WithTheReason()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        int port = FreePort();
        using var service = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings,
            "--Seamwright:Operations:HeartbeatSeconds=1", $"--Seamwright:Operations:HttpListen=127.0.0.1:{port}",
            "--Seamwright:Operations:PauseBelowFreeMegabytes=1000000000"]);
        using var http = new HttpClient { Timeout = TimeSpan.FromSeconds(30) };
        HttpStatusCode status;
        string body;
        var end = DateTime.UtcNow + Limit;
        do
        {
            using var response = await GetWhenUp(http, $"http://127.0.0.1:{port}/health", service);
            status = response.StatusCode;
            body = await response.Content.ReadAsStringAsync();
            await Task.Delay(250);
        }
        while (status == HttpStatusCode.OK && DateTime.UtcNow < end);
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        output.WriteLine(body);
        Assert.Equal(HttpStatusCode.ServiceUnavailable, status);
        using var doc = JsonDocument.Parse(body);
        Assert.Equal("unhealthy", doc.RootElement.GetProperty("status").GetString());
        Assert.Contains("intake paused", body, StringComparison.Ordinal);
    }
}
