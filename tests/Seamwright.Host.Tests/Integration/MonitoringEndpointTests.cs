using System.Net;
using System.Net.Sockets;
using System.Text.Json;
using Seamwright.Pipeline.State;
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
            "--Seamwright:Operations:HeartbeatSeconds=1", $"--Seamwright:Operations:HttpListen=127.0.0.1:{port}"]);
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
        Assert.Equal(HttpStatusCode.OK, health.StatusCode);
        using var doc = JsonDocument.Parse(healthBody);
        Assert.Equal("healthy", doc.RootElement.GetProperty("status").GetString());

        Assert.Equal(ExitCodes.BadArguments, secondCode);
        Assert.Contains("seamwright: cannot start:", secondErr, StringComparison.Ordinal);
        Assert.Single(secondErr.Trim().Split('\n'));
        Assert.DoesNotContain("   at ", secondOut + secondErr, StringComparison.Ordinal);
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
