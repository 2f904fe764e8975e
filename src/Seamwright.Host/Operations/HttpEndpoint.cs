using System.Net;
using System.Text.Json;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Diagnostics.HealthChecks;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Diagnostics.HealthChecks;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Prometheus;

namespace Seamwright.Host.Operations;

/// <summary>
/// The monitoring endpoint of `watch`, off unless <c>Seamwright:Operations:HttpListen</c> names an
/// address (for example <c>127.0.0.1:9464</c>): <c>GET /metrics</c> in the Prometheus text format
/// (the <see cref="ServiceMeters"/> instruments exported by prometheus-net's meter adapter, names
/// <c>seamwright_*</c>) and <c>GET /health</c> (ASP.NET Core health checks: 200 when healthy, 503
/// otherwise, with a JSON body). A small Kestrel application of its own, started and stopped
/// with the service; it only reads.
/// </summary>
internal sealed partial class HttpEndpoint(IPEndPoint listen, HealthMonitor health, Func<OperationsFigures?> last, ILogger<HttpEndpoint> log) : IHostedService, IAsyncDisposable
{
    private WebApplication? _app;

    /// <summary>Parses <c>host:port</c> (an IPv4 or bracketed IPv6 address, or <c>localhost</c>); null with the reason when it is not one.</summary>
    public static IPEndPoint? Parse(string value, out string? problem)
    {
        problem = null;
        string v = value.Trim();
        if (v.StartsWith("localhost:", StringComparison.OrdinalIgnoreCase))
        {
            v = "127.0.0.1" + v["localhost".Length..];
        }
        if (IPEndPoint.TryParse(v, out var ep) && ep.Port is > 0 and <= 65535 && v.Contains(':', StringComparison.Ordinal))
        {
            return ep;
        }
        problem = $"'{value}' is not an address and port such as 127.0.0.1:9464 or [::1]:9464 (port 1..65535)";
        return null;
    }

    /// <summary>Sends only our own meter; the meter adapter starts collecting now, so nothing recorded before the first scrape is lost.</summary>
    public static void ConfigureExport()
    {
        Metrics.SuppressDefaultMetrics(new SuppressDefaultMetricOptions
        {
            SuppressProcessMetrics = false,
            SuppressDebugMetrics = true,
            SuppressEventCounters = true,
            SuppressMeters = false,
        });
        Metrics.ConfigureMeterAdapter(o =>
        {
            o.InstrumentFilterPredicate = i => i.Meter.Name == ServiceMeters.MeterName;
            o.ResolveHistogramBuckets = _ => ServiceMeters.LatencyBuckets;
        });
        Metrics.DefaultRegistry.CollectAndExportAsTextAsync(Stream.Null).GetAwaiter().GetResult();
    }

    public async Task StartAsync(CancellationToken cancellationToken)
    {
        var builder = WebApplication.CreateSlimBuilder(new WebApplicationOptions { ContentRootPath = AppContext.BaseDirectory });
        builder.Logging.ClearProviders();
        builder.WebHost.UseKestrel(k => k.Listen(listen));
        builder.Services.AddHealthChecks().AddCheck("service", new ServiceHealthCheck(health, last));
        _app = builder.Build();
        _app.MapMetrics("/metrics");
        _app.MapHealthChecks("/health", new HealthCheckOptions
        {
            ResultStatusCodes =
            {
                [HealthStatus.Healthy] = StatusCodes.Status200OK,
                [HealthStatus.Degraded] = StatusCodes.Status503ServiceUnavailable,
                [HealthStatus.Unhealthy] = StatusCodes.Status503ServiceUnavailable,
            },
            ResponseWriter = WriteJson,
        });
        await _app.StartAsync(cancellationToken).ConfigureAwait(false);
        LogListening(log, listen.ToString());
    }

    public async Task StopAsync(CancellationToken cancellationToken)
    {
        if (_app is not null)
        {
            await _app.StopAsync(cancellationToken).ConfigureAwait(false);
        }
    }

    public async ValueTask DisposeAsync()
    {
        if (_app is not null)
        {
            await _app.DisposeAsync().ConfigureAwait(false);
        }
    }

    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web) { WriteIndented = true };

    private static Task WriteJson(HttpContext context, Microsoft.Extensions.Diagnostics.HealthChecks.HealthReport report)
    {
        context.Response.ContentType = "application/json; charset=utf-8";
        var body = new
        {
            status = report.Status == HealthStatus.Healthy ? "healthy" : "unhealthy",
            checks = report.Entries.Select(e => new
            {
                name = e.Key,
                status = e.Value.Status == HealthStatus.Healthy ? "healthy" : "unhealthy",
                description = e.Value.Description,
                data = e.Value.Data,
            }),
        };
        return context.Response.WriteAsync(JsonSerializer.Serialize(body, Json));
    }

    [LoggerMessage(Level = LogLevel.Information, Message = "Monitoring endpoint on http://{Address} (/metrics, /health)")]
    private static partial void LogListening(ILogger logger, string address);
}

/// <summary>Healthy while every service loop beats and intake is not paused for lack of disk space.</summary>
internal sealed class ServiceHealthCheck(HealthMonitor health, Func<OperationsFigures?> last) : IHealthCheck
{
    public Task<HealthCheckResult> CheckHealthAsync(HealthCheckContext context, CancellationToken cancellationToken = default)
    {
        var report = health.Evaluate();
        var figures = last();
        var problems = report.Problems.ToList();
        if (figures?.PauseReason is { } paused)
        {
            problems.Add(paused);
        }
        var data = new Dictionary<string, object>
        {
            ["problems"] = problems,
            ["queueDepth"] = figures?.QueueDepth ?? 0,
            ["lastHeartbeat"] = figures?.At.ToString("O", System.Globalization.CultureInfo.InvariantCulture) ?? "",
            ["quarantined"] = figures?.Quarantined.Count ?? 0,
        };
        return Task.FromResult(problems.Count == 0
            ? HealthCheckResult.Healthy("every service loop beats", data)
            : HealthCheckResult.Unhealthy(string.Join("; ", problems), data: data));
    }
}
