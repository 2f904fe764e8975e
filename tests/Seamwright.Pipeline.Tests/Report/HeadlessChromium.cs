using System.Diagnostics;
using System.Net.WebSockets;
using System.Text;
using System.Text.Json;
using System.Text.Json.Nodes;

namespace Seamwright.Pipeline.Tests.Report;

/// <summary>
/// Debian's Chromium started headless with a fresh profile and driven over the DevTools protocol
/// (a local websocket): open a page, collect script errors, evaluate expressions.
/// </summary>
internal sealed class HeadlessChromium : IAsyncDisposable
{
    private static readonly TimeSpan Guard = TimeSpan.FromSeconds(90);
    private readonly Process _process;
    private readonly string _profile;
    private readonly ClientWebSocket _socket = new();
    private readonly List<JsonObject> _events = [];
    private int _nextId;
    private string? _session;

    private HeadlessChromium(Process process, string profile)
    {
        _process = process;
        _profile = profile;
    }

    /// <summary>Path of the chromium executable, or null when it is not installed.</summary>
    public static string? Find()
    {
        foreach (string name in new[] { "chromium", "chromium-browser" })
        {
            foreach (string dir in (Environment.GetEnvironmentVariable("PATH") ?? "").Split(Path.PathSeparator))
            {
                string p = Path.Combine(dir, name);
                if (File.Exists(p))
                {
                    return p;
                }
            }
        }
        return null;
    }

    public static async Task<HeadlessChromium> StartAsync(string executable)
    {
        string profile = Path.Combine(Path.GetTempPath(), "seamwright-chromium-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(profile);
        var info = new ProcessStartInfo(executable)
        {
            RedirectStandardError = true,
            RedirectStandardOutput = true,
            UseShellExecute = false,
        };
        foreach (string a in new[]
        {
            "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
            "--disable-background-networking", "--disable-component-update", "--disable-sync",
            "--user-data-dir=" + profile, "--remote-debugging-address=127.0.0.1", "--remote-debugging-port=0", "about:blank",
        })
        {
            info.ArgumentList.Add(a);
        }
        var process = Process.Start(info) ?? throw new InvalidOperationException("chromium did not start");
        var browser = new HeadlessChromium(process, profile);
        using var cts = new CancellationTokenSource(Guard);
        string? url = null;
        while (url is null)
        {
            string? line = await process.StandardError.ReadLineAsync(cts.Token);
            if (line is null)
            {
                throw new InvalidOperationException("chromium exited before opening its DevTools endpoint");
            }
            int at = line.IndexOf("ws://", StringComparison.Ordinal);
            if (line.StartsWith("DevTools listening on", StringComparison.Ordinal) && at >= 0)
            {
                url = line[at..].Trim();
            }
        }
        _ = DrainAsync(process.StandardError);
        _ = DrainAsync(process.StandardOutput);
        await browser._socket.ConnectAsync(new Uri(url), cts.Token);
        var target = await browser.SendAsync("Target.createTarget", new JsonObject { ["url"] = "about:blank" }, useSession: false);
        var attached = await browser.SendAsync("Target.attachToTarget", new JsonObject { ["targetId"] = target["targetId"]!.GetValue<string>(), ["flatten"] = true }, useSession: false);
        browser._session = attached["sessionId"]!.GetValue<string>();
        await browser.SendAsync("Runtime.enable", []);
        await browser.SendAsync("Page.enable", []);
        await browser.SendAsync("Log.enable", []);
        return browser;
    }

    /// <summary>Script errors seen so far (exceptions, console errors, error log entries).</summary>
    public IReadOnlyList<string> Errors => [.. _events.Where(IsError).Select(e => e.ToJsonString())];

    /// <summary>Sets the page's viewport in CSS pixels (device scale 1), as a desktop window of that size shows it.</summary>
    public Task SetViewportAsync(int width, int height) =>
        SendAsync("Emulation.setDeviceMetricsOverride", new JsonObject { ["width"] = width, ["height"] = height, ["deviceScaleFactor"] = 1, ["mobile"] = false });

    /// <summary>Opens the page and waits for its load event.</summary>
    public async Task NavigateAsync(string url)
    {
        _events.Clear();
        await SendAsync("Page.navigate", new JsonObject { ["url"] = url });
        using var cts = new CancellationTokenSource(Guard);
        while (!_events.Any(e => (string?)e["method"] == "Page.loadEventFired"))
        {
            _events.Add(await ReceiveAsync(cts.Token));
        }
    }

    /// <summary>Evaluates an expression in the page and returns its value as JSON.</summary>
    public async Task<JsonNode?> EvaluateAsync(string expression)
    {
        var result = await SendAsync("Runtime.evaluate", new JsonObject { ["expression"] = expression, ["returnByValue"] = true, ["awaitPromise"] = true });
        if (result["exceptionDetails"] is JsonNode ex)
        {
            throw new InvalidOperationException("evaluation failed: " + ex.ToJsonString());
        }
        return result["result"]?["value"];
    }

    public async Task<byte[]> ScreenshotAsync()
    {
        var result = await SendAsync("Page.captureScreenshot", new JsonObject { ["format"] = "png", ["captureBeyondViewport"] = true });
        return Convert.FromBase64String(result["data"]!.GetValue<string>());
    }

    private static bool IsError(JsonObject e)
    {
        string? method = (string?)e["method"];
        return method == "Runtime.exceptionThrown"
            || (method == "Runtime.consoleAPICalled" && (string?)e["params"]?["type"] == "error")
            || (method == "Log.entryAdded" && (string?)e["params"]?["entry"]?["level"] == "error");
    }

    private async Task<JsonObject> SendAsync(string method, JsonObject parameters, bool useSession = true)
    {
        int id = ++_nextId;
        var message = new JsonObject { ["id"] = id, ["method"] = method, ["params"] = parameters };
        if (useSession && _session is not null)
        {
            message["sessionId"] = _session;
        }
        using var cts = new CancellationTokenSource(Guard);
        await _socket.SendAsync(Encoding.UTF8.GetBytes(message.ToJsonString()), WebSocketMessageType.Text, true, cts.Token);
        while (true)
        {
            var reply = await ReceiveAsync(cts.Token);
            if (reply["id"] is JsonNode rid && rid.GetValue<int>() == id)
            {
                if (reply["error"] is JsonNode error)
                {
                    throw new InvalidOperationException($"{method} failed: {error.ToJsonString()}");
                }
                return reply["result"]?.AsObject() ?? [];
            }
            _events.Add(reply);
        }
    }

    private async Task<JsonObject> ReceiveAsync(CancellationToken token)
    {
        var buffer = new byte[64 * 1024];
        using var message = new MemoryStream();
        while (true)
        {
            var r = await _socket.ReceiveAsync(buffer, token);
            if (r.MessageType == WebSocketMessageType.Close)
            {
                throw new InvalidOperationException("DevTools socket closed");
            }
            message.Write(buffer, 0, r.Count);
            if (r.EndOfMessage)
            {
                break;
            }
        }
        return JsonNode.Parse(message.ToArray())!.AsObject();
    }

    private static async Task DrainAsync(StreamReader reader)
    {
        try
        {
            while (await reader.ReadLineAsync() is not null)
            {
            }
        }
        catch (IOException)
        {
        }
        catch (ObjectDisposedException)
        {
        }
    }

    public async ValueTask DisposeAsync()
    {
        try
        {
            if (_socket.State == WebSocketState.Open)
            {
                using var cts = new CancellationTokenSource(TimeSpan.FromSeconds(10));
                var close = new JsonObject { ["id"] = ++_nextId, ["method"] = "Browser.close", ["params"] = new JsonObject() };
                await _socket.SendAsync(Encoding.UTF8.GetBytes(close.ToJsonString()), WebSocketMessageType.Text, true, cts.Token);
            }
        }
        catch (WebSocketException)
        {
        }
        catch (OperationCanceledException)
        {
        }
        if (!_process.WaitForExit(10_000))
        {
            _process.Kill(entireProcessTree: true);
            _process.WaitForExit();
        }
        _process.Dispose();
        _socket.Dispose();
        try
        {
            Directory.Delete(_profile, recursive: true);
        }
        catch (IOException)
        {
        }
        catch (UnauthorizedAccessException)
        {
        }
    }
}
