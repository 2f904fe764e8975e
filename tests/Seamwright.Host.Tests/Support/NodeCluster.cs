using System.Diagnostics;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;

namespace Seamwright.Tests.Support;

/// <summary>
/// Several real <c>seamwright watch</c> processes (nodes) on one watched root and one output root,
/// sharing a PostgreSQL ledger; plus the checks every multi-node test makes.
/// </summary>
internal sealed class NodeCluster : IDisposable
{
    private readonly string _root;
    private readonly string _output;
    private readonly string _connection;
    private readonly string[] _extra;

    public NodeCluster(string workDir, string root, string output, string connection, double leaseSeconds, params string[] extra)
    {
        WorkDir = workDir;
        _root = root;
        _output = output;
        _connection = connection;
        LeaseSeconds = leaseSeconds;
        _extra = extra;
    }

    public string WorkDir { get; }

    public double LeaseSeconds { get; }

    public Dictionary<string, SeamwrightProcess> Nodes { get; } = new(StringComparer.Ordinal);

    /// <summary>Everything each node printed, across restarts.</summary>
    public Dictionary<string, System.Text.StringBuilder> Logs { get; } = new(StringComparer.Ordinal);

    public StateSettings State => new() { Provider = StateProviders.PostgreSql, ConnectionString = _connection, LeaseSeconds = LeaseSeconds };

    /// <summary>Starts a node; <paramref name="more"/> are settings of this node only (after the cluster's).</summary>
    public void Start(string node, params string[] more)
    {
        var env = new Dictionary<string, string>
        {
            ["Seamwright__State__Provider"] = StateProviders.PostgreSql,
            ["Seamwright__State__ConnectionString"] = _connection,
        };
        Nodes[node] = SeamwrightProcess.StartWithEnvironment(WorkDir, env,
        [
            "watch", _root, "--output", _output, .. SeamwrightProcess.FastSettings,
            "--Seamwright:Service:NodeName=" + node,
            "--Seamwright:State:LeaseSeconds=" + LeaseSeconds.ToString(System.Globalization.CultureInfo.InvariantCulture),
            .. _extra,
            .. more,
        ]);
    }

    /// <summary>Waits until the node's current process has registered in the ledger and beaten once from its running host (start-up is over).</summary>
    public void WaitRegistered(string node, TimeSpan timeout)
    {
        int pid = Nodes[node].ProcessId;
        WaitUntil(st => st.Nodes().Any(n => n.Node == node && n.ProcessId == pid && n.LastBeatUtc > n.StartedUtc), timeout, $"node {node} (process {pid}) running");
    }

    /// <summary>SIGKILL; the node's output so far is kept in <see cref="Logs"/>.</summary>
    public void Kill(string node)
    {
        var p = Nodes[node];
        p.Kill();
        Keep(node, p);
        p.Dispose();
        Nodes.Remove(node);
    }

    public void StopAll()
    {
        foreach (var (node, p) in Nodes.ToList())
        {
            p.Terminate();
            Assert.True(p.WaitForExit(TimeSpan.FromSeconds(90)), $"node {node} did not stop");
            Keep(node, p);
            Assert.True(p.ExitCode == 0, $"node {node} exited {p.ExitCode}:\n{p.Output}\n{p.Errors}");
            p.Dispose();
        }
        Nodes.Clear();
    }

    private void Keep(string node, SeamwrightProcess p)
    {
        if (!Logs.TryGetValue(node, out var sb))
        {
            Logs[node] = sb = new System.Text.StringBuilder();
        }
        sb.Append(p.Output).Append(p.Errors);
    }

    public T Read<T>(Func<StateStore, T> query)
    {
        using var store = StateStore.Open(_output, State, readOnly: true);
        return query(store);
    }

    /// <summary>Waits for <paramref name="done"/> (polled twice a second), failing if a node exits by itself.</summary>
    public void WaitUntil(Func<StateStore, bool> done, TimeSpan timeout, string what)
    {
        var end = DateTime.UtcNow + timeout;
        while (DateTime.UtcNow < end)
        {
            foreach (var (node, p) in Nodes)
            {
                if (p.HasExited)
                {
                    Assert.Fail($"node {node} exited ({p.ExitCode}) while waiting for {what}:\n{p.Output}\n{p.Errors}");
                }
            }
            try
            {
                if (Read(done))
                {
                    return;
                }
            }
            catch (Exception e) when (e is FileNotFoundException or System.Data.Common.DbException)
            {
                // not initialised yet, or the server is stopped on purpose: look again
            }
            Thread.Sleep(500);
        }
        Assert.Fail($"timed out after {timeout} waiting for {what}\n" + string.Join("\n", Nodes.Select(n => n.Key + ":\n" + n.Value.Output + n.Value.Errors)));
    }

    public void Dispose()
    {
        foreach (var p in Nodes.Values)
        {
            p.Dispose();
        }
    }

    /// <summary>Writes <paramref name="sets"/> sets of <paramref name="perSet"/> distinct small images at once (write-then-rename).</summary>
    public static void DropSets(string root, int sets, int perSet, int seedBase = 0)
    {
        for (int s = 0; s < sets; s++)
        {
            string folder = Path.Combine(root, $"set{s:D2}");
            Directory.CreateDirectory(folder);
            for (int i = 0; i < perSet; i++)
            {
                string target = Path.Combine(folder, $"img{i:D3}.png");
                File.WriteAllBytes(target + ".part", TestImages.Png(seedBase + s * 1000 + i, 96, 96));
                File.Move(target + ".part", target);
            }
        }
    }

    /// <summary>
    /// The checks after the nodes stop: every set's newest manifest lists a complete run; no
    /// duplicate confidence record per (run, set, pair); no temporary file; returns the records.
    /// </summary>
    public static IReadOnlyList<ConfidenceRecord> CheckComplete(string output, int sets, int perSet)
    {
        for (int s = 0; s < sets; s++)
        {
            var m = OutputChecks.ManifestIsComplete(Path.Combine(output, $"set{s:D2}"));
            Assert.Equal(perSet, m.Images.Distinct().Count());
            Assert.Equal(perSet, m.Files.Count(f => f.Kind == "sidecar"));
            Assert.False(string.IsNullOrEmpty(m.Node), $"manifest of {m.Set} names no node");
        }
        var records = ConfidenceLog.ReadAll(Path.Combine(output, ConfidenceLog.FileName));
        var dupes = records.GroupBy(r => (r.Run, r.Set, r.ImageA, r.ImageB)).Where(g => g.Count() > 1).Select(g => g.Key).ToList();
        Assert.True(dupes.Count == 0, "duplicate confidence records: " + string.Join(", ", dupes.Take(5)));
        Assert.All(records, r => Assert.False(string.IsNullOrEmpty(r.Node)));
        Assert.Empty(OutputChecks.Temporaries(output));
        return records;
    }

    /// <summary>
    /// Every output file of the set folders, with what names a run or a node blanked out (run ids
    /// differ between ledgers; the node is named only on a shared ledger): JSON parsed and the
    /// <c>run</c> and <c>node</c> fields removed, the report's run number removed, anything else byte for byte.
    /// </summary>
    public static Dictionary<string, string> ComparableOutputs(string output)
    {
        var result = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var f in Directory.EnumerateFiles(output, "*", SearchOption.AllDirectories).Order(StringComparer.Ordinal))
        {
            string rel = Path.GetRelativePath(output, f);
            if (rel.StartsWith(StateStore.StateFolder, StringComparison.Ordinal) || rel == ConfidenceLog.FileName)
            {
                continue;
            }
            byte[] bytes = File.ReadAllBytes(f);
            string text;
            if (f.EndsWith(".json", StringComparison.Ordinal))
            {
                var node = System.Text.Json.Nodes.JsonNode.Parse(bytes)!;
                if (node is System.Text.Json.Nodes.JsonObject o)
                {
                    o.Remove("run");
                    o.Remove("node");
                    o.Remove("time"); // the UTC time the manifest or sidecar was written
                    if (o["files"] is System.Text.Json.Nodes.JsonArray files)
                    {
                        // digests of files that name the run
                        foreach (var e in files.OfType<System.Text.Json.Nodes.JsonObject>())
                        {
                            e.Remove("sha256");
                        }
                    }
                }
                text = node.ToJsonString();
            }
            else if (f.EndsWith(".html", StringComparison.Ordinal))
            {
                // run ids, and the verdict's input folder and written time (marked volatile by the report)
                text = OutputNormalisation.WithoutRunLabels(OutputNormalisation.WithoutVolatileSpans(System.Text.Encoding.UTF8.GetString(bytes), "VOLATILE"));
            }
            else
            {
                text = Convert.ToHexString(System.Security.Cryptography.SHA256.HashData(bytes));
            }
            result[rel] = text;
        }
        return result;
    }

    /// <summary>The confidence records of each set's newest run, by (set, pair), with run, node and timings blanked.</summary>
    public static Dictionary<string, string> ComparableRecords(string output, Func<string, long> newestRun)
    {
        var result = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var r in ConfidenceLog.ReadAll(Path.Combine(output, ConfidenceLog.FileName)))
        {
            if (r.Run == newestRun(r.Set))
            {
                var blank = r with { Run = 0, Node = null, Time = "", TimingsMs = new ConfidenceTimings(0, 0, 0, 0, 0) };
                result[$"{r.Set}|{r.ImageA}|{r.ImageB}"] = OutputJson.ConfidenceLine(blank);
            }
        }
        return result;
    }

    public static Stopwatch Clock() => Stopwatch.StartNew();
}
