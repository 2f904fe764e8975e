using System.Diagnostics;
using System.Globalization;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// <c>nodes [--sets N] [--images K] [--nodes M] [--pg CONNECTION] [--keep] [--Seamwright:...=value ...]</c>:
/// the time for N sets (default 24) of K tiles each (default 6: consecutive stretches of the
/// <c>scale</c> benchmark's rendered sweep, so every set is different work) on one `watch` node
/// with the SQLite ledger, then on M (default 3) `watch` nodes sharing one PostgreSQL ledger
/// (<c>--pg</c>, else <c>SEAMWRIGHT_TEST_PG</c>), all real processes of the built host on this
/// machine. Each configuration starts its nodes on an empty root, waits until they run, moves every
/// set folder into the root at once (renames) and times from there until the ledger says every set
/// is done; then it stops the nodes and checks every set has its manifest. Prints both wall times,
/// their ratio, which nodes did the runs, and the load average before and after.
/// </summary>
internal static class NodesBenchmark
{
    /// <summary>Quick completion so the wait for files to settle is a small constant in both configurations.</summary>
    private static readonly string[] Quick =
    [
        "--Seamwright:Service:StableSeconds=1",
        "--Seamwright:Service:PollMilliseconds=200",
        "--Seamwright:Service:RescanSeconds=5",
        "--Seamwright:Profiles:default:Completion:QuietSeconds=2",
    ];

    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(30);

    public static int Run(string[] args)
    {
        int sets = 24, images = 6, nodes = 3;
        string? pg = Environment.GetEnvironmentVariable(TestPostgres.Variable);
        bool keep = false;
        var overrides = new List<string>();
        for (int i = 0; i < args.Length; i++)
        {
            switch (args[i])
            {
                case "--sets": sets = int.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--images": images = int.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--nodes": nodes = int.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--pg": pg = args[++i]; break;
                case "--keep": keep = true; break;
                default: overrides.Add(args[i]); break;
            }
        }
        if (string.IsNullOrWhiteSpace(pg) || sets < 1 || images < 2 || nodes < 1)
        {
            Console.Error.WriteLine("usage: nodes [--sets N] [--images K>=2] [--nodes M] [--pg CONNECTION] [--keep] [--Seamwright:...=value ...]");
            Console.Error.WriteLine($"  needs a PostgreSQL server: --pg or {TestPostgres.Variable} (eval \"$(bash tools/test-postgres.sh start)\" starts one)");
            return 2;
        }
        string cache = Path.Combine(Path.GetTempPath(), "seamwright-scale");
        var clock = Stopwatch.StartNew();
        string sweep = ScaleGrid.Ensure(sets * images, 11, cache, sweep: true);
        Console.WriteLine($"tiles: a sweep of {sets * images} tiles of {ScaleGrid.TileWidth}x{ScaleGrid.TileHeight} in {sweep} (ready in {clock.Elapsed.TotalSeconds:0.0} s); {sets} sets of {images}");
        string work = Path.Combine(cache, "nodes-" + Environment.ProcessId.ToString(CultureInfo.InvariantCulture));
        string dll = ScaleProcess.Dll(RepoPaths.Root);
        if (!File.Exists(dll))
        {
            Console.Error.WriteLine($"{dll} not found: build the host first (dotnet build src/Seamwright.Host -c Release)");
            return 2;
        }
        try
        {
            var one = Measure("one node, SQLite", Path.Combine(work, "sqlite"), sweep, sets, images, dll,
                new StateSettings(), ["solo"], overrides);
            var many = Measure($"{nodes} nodes, PostgreSQL", Path.Combine(work, "postgresql"), sweep, sets, images, dll,
                new StateSettings { Provider = StateProviders.PostgreSql, ConnectionString = pg }, [.. Enumerable.Range(1, nodes).Select(k => "n" + k.ToString(CultureInfo.InvariantCulture))], overrides);
            if (one is null || many is null)
            {
                return 1;
            }
            Console.WriteLine($"{sets} sets x {images} tiles: one SQLite node {one.Value.TotalSeconds:0.0} s, {nodes} PostgreSQL nodes {many.Value.TotalSeconds:0.0} s; " +
                $"{nodes} nodes / one node = {many.Value.TotalSeconds / one.Value.TotalSeconds:0.00} on {Environment.ProcessorCount} cores");
            return 0;
        }
        finally
        {
            if (!keep && Directory.Exists(work))
            {
                Directory.Delete(work, recursive: true);
            }
        }
    }

    /// <summary>One configuration: start the nodes, drop every set at once, time until the ledger has them all done, stop.</summary>
    private static TimeSpan? Measure(string label, string work, string sweep, int sets, int images, string dll,
        StateSettings state, IReadOnlyList<string> nodeNames, IReadOnlyList<string> overrides)
    {
        string staging = Path.Combine(work, "staging");
        string root = Path.Combine(work, "in");
        string output = Path.Combine(work, "out");
        Stage(sweep, staging, sets, images);
        Directory.CreateDirectory(root);
        Console.WriteLine($"{label}: load {File.ReadAllText("/proc/loadavg").Trim()}");
        var started = new List<NodeProcess>();
        try
        {
            foreach (string node in nodeNames)
            {
                started.Add(NodeProcess.Start(dll, root, output, node, state, [.. Quick, .. overrides]));
            }
            WaitRunning(started, output, state);
            var clock = Stopwatch.StartNew();
            foreach (string set in Directory.GetDirectories(staging).Order(StringComparer.Ordinal))
            {
                Directory.Move(set, Path.Combine(root, Path.GetFileName(set)));
            }
            if (!WaitUntil(started, () => AllDone(output, state, sets), "every set done"))
            {
                return null;
            }
            var wall = clock.Elapsed;
            var runs = Read(output, state, st => st.Runs());
            Console.WriteLine($"{label}: {sets} sets done {wall.TotalSeconds:0.0} s after the drop; runs {runs.Count} (" +
                string.Join(", ", runs.Where(r => r.State == "done").GroupBy(r => r.Node ?? nodeNames[0]).OrderBy(g => g.Key, StringComparer.Ordinal)
                    .Select(g => $"{g.Key} {g.Count()}")) + $"; abandoned {runs.Count(r => r.State == "abandoned")}); load {File.ReadAllText("/proc/loadavg").Trim()}");
            foreach (var p in started)
            {
                p.Stop();
            }
            int missing = Enumerable.Range(0, sets).Count(s => !File.Exists(Path.Combine(output, SetName(s), OutputLayout.ManifestName)));
            if (missing > 0)
            {
                Console.Error.WriteLine($"{label}: {missing} sets have no manifest");
                return null;
            }
            return wall;
        }
        finally
        {
            foreach (var p in started)
            {
                p.Dispose();
            }
        }
    }

    private static string SetName(int s) => "set" + s.ToString("D2", CultureInfo.InvariantCulture);

    /// <summary>Set s gets tiles s*K .. s*K+K-1 of the sweep (neighbours overlap), copied into its own folder.</summary>
    private static void Stage(string sweep, string staging, int sets, int images)
    {
        for (int s = 0; s < sets; s++)
        {
            string folder = Path.Combine(staging, SetName(s));
            Directory.CreateDirectory(folder);
            for (int i = 0; i < images; i++)
            {
                string name = ScaleGrid.Name(0, s * images + i);
                File.Copy(Path.Combine(sweep, "input", "grid", name), Path.Combine(folder, name));
            }
        }
    }

    private static void WaitRunning(List<NodeProcess> nodes, string output, StateSettings state)
    {
        string heartbeat = Path.Combine(output, StateStore.StateFolder, "heartbeat.json");
        bool Running() => StateProviders.IsPostgreSql(state.Provider)
            ? Read(output, state, st => nodes.All(p => st.Nodes().Any(n => n.Node == p.Name && n.ProcessId == p.Id && n.LastBeatUtc > n.StartedUtc)))
            : File.Exists(heartbeat);
        if (!WaitUntil(nodes, Running, "the nodes running"))
        {
            throw new InvalidOperationException("the nodes did not start");
        }
    }

    private static bool AllDone(string output, StateSettings state, int sets) =>
        Read(output, state, st => st.Sets() is var all && all.Count == sets && all.All(s => s.State == SetStates.Done));

    private static T Read<T>(string output, StateSettings state, Func<StateStore, T> query)
    {
        using var store = StateStore.Open(output, state, readOnly: true);
        return query(store);
    }

    /// <summary>Polls <paramref name="done"/> four times a second; false (with the nodes' output) when a node exits or time runs out.</summary>
    private static bool WaitUntil(List<NodeProcess> nodes, Func<bool> done, string what)
    {
        var end = DateTime.UtcNow + Limit;
        while (DateTime.UtcNow < end)
        {
            if (nodes.FirstOrDefault(n => n.HasExited) is { } gone)
            {
                Console.Error.WriteLine($"node {gone.Name} exited while waiting for {what}:\n{gone.Log}");
                return false;
            }
            try
            {
                if (done())
                {
                    return true;
                }
            }
            catch (Exception e) when (e is FileNotFoundException or System.Data.Common.DbException or Microsoft.Data.Sqlite.SqliteException)
            {
                // the ledger is not there yet, or busy: look again
            }
            Thread.Sleep(250);
        }
        Console.Error.WriteLine($"timed out waiting for {what}:\n" + string.Join("\n", nodes.Select(n => n.Name + ":\n" + n.Log)));
        return false;
    }

    /// <summary>One `seamwright watch` child process.</summary>
    private sealed class NodeProcess : IDisposable
    {
        private readonly Process _process;
        private readonly System.Text.StringBuilder _log = new();

        private NodeProcess(string name, Process process)
        {
            Name = name;
            _process = process;
        }

        public string Name { get; }

        public int Id => _process.Id;

        public bool HasExited => _process.HasExited;

        public string Log
        {
            get
            {
                lock (_log)
                {
                    return _log.ToString();
                }
            }
        }

        public static NodeProcess Start(string dll, string root, string output, string name, StateSettings state, IReadOnlyList<string> settings)
        {
            var psi = new ProcessStartInfo(Environment.GetEnvironmentVariable("DOTNET_HOST_PATH") ?? "dotnet")
            {
                RedirectStandardOutput = true,
                RedirectStandardError = true,
                UseShellExecute = false,
            };
            foreach (string a in (string[])[dll, "watch", root, "--output", output, "--Seamwright:Service:NodeName=" + name, .. settings])
            {
                psi.ArgumentList.Add(a);
            }
            psi.Environment["DOTNET_CLI_TELEMETRY_OPTOUT"] = "1";
            psi.Environment["Seamwright__State__Provider"] = state.Provider;
            psi.Environment["Seamwright__State__ConnectionString"] = state.ConnectionString;
            var node = new NodeProcess(name, new Process { StartInfo = psi });
            node._process.OutputDataReceived += (_, e) => node.Append(e.Data);
            node._process.ErrorDataReceived += (_, e) => node.Append(e.Data);
            node._process.Start();
            node._process.BeginOutputReadLine();
            node._process.BeginErrorReadLine();
            return node;
        }

        private void Append(string? line)
        {
            if (line is not null)
            {
                lock (_log)
                {
                    _log.AppendLine(line);
                }
            }
        }

        /// <summary>SIGTERM and wait (a clean stop); killed after two minutes.</summary>
        public void Stop()
        {
            if (_process.HasExited)
            {
                return;
            }
            using (var kill = Process.Start("kill", ["-TERM", Id.ToString(CultureInfo.InvariantCulture)]))
            {
                kill.WaitForExit();
            }
            if (!_process.WaitForExit(TimeSpan.FromMinutes(2)))
            {
                _process.Kill(entireProcessTree: true);
            }
        }

        public void Dispose()
        {
            if (!_process.HasExited)
            {
                _process.Kill(entireProcessTree: true);
                _process.WaitForExit();
            }
            _process.Dispose();
        }
    }
}
