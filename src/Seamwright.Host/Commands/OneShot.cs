using Seamwright.Host.Configuration;
using Seamwright.Host.Terminal;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;
using Serilog;
using Serilog.Formatting.Compact;
using Spectre.Console;

namespace Seamwright.Host.Commands;

/// <summary>What a one-shot pass does: <c>run</c> (every set not up to date) or <c>rerun</c> (the same, limited to a path, optionally forced or dry).</summary>
internal sealed record OneShotRequest(string Folder, string? Output, string? ConfigFile, string[] Overrides, string? Within, bool DryRun, bool Force, bool Strict = false);

/// <summary>One pass over a root: discover sets, skip the unchanged, process the rest, print a summary, return the exit code.</summary>
internal static class OneShot
{
    public static int Execute(OneShotRequest req)
    {
        if (ReadSettings(req, out var options, out var root) is int bad)
        {
            return bad;
        }
        string output = root.EffectiveOutput;
        IPairEngine engine;
        try
        {
            engine = EngineFactory.Create(options.Engine);
        }
        catch (NotSupportedException e)
        {
            System.Console.Error.WriteLine("seamwright: " + e.Message);
            return ExitCodes.Fatal;
        }

        if (req.DryRun)
        {
            return DryRun(req, options, root, engine);
        }
        bool interactive = RunProgress.TerminalIsInteractive();
        using var log = new LoggerConfiguration()
            .MinimumLevel.Debug()
            .Enrich.WithProperty("Command", req.DryRun ? "rerun --dry-run" : "run")
            .WriteTo.File(new CompactJsonFormatter(), Path.Combine(output, StateStore.StateFolder, "logs", "seamwright-.log"),
                rollingInterval: RollingInterval.Day, retainedFileCountLimit: 31, shared: true)
            .CreateLogger();
        var progress = new RunProgress(log, interactive);
        var started = System.Diagnostics.Stopwatch.StartNew();
        RootSession session;
        try
        {
            session = RootSession.Open(root, options, engine, new MemoryBudget((long)options.Service.MemoryBudgetMegabytes << 20),
                new SemaphoreSlim(options.Service.MaxParallelJobs), progress);
        }
        catch (OutputRootBusyException e)
        {
            System.Console.Error.WriteLine("seamwright: " + e.Message);
            return ExitCodes.Fatal;
        }
        using (session)
        {
            Announce(session, log);
            var all = session.Catalog.Discover();
            var sets = req.Within is null ? all : all.Where(s => InScope(session, s, req.Within)).ToList();
            if (req.Within is not null && sets.Count == 0)
            {
                System.Console.Error.WriteLine($"seamwright: no set found under {req.Within}");
                return ExitCodes.BadArguments;
            }
            RetireRemoved(session, all, req, log);
            var todo = ToRedo(session, sets, req.Force);
            if (todo.Count == 0)
            {
                System.Console.Out.WriteLine($"Nothing to do: all {sets.Count} sets are unchanged since their last run (inputs and settings). Outputs in {output}");
                log.Information("Nothing to do: {Sets} sets unchanged", sets.Count);
            }
            var outcomes = new System.Collections.Concurrent.ConcurrentDictionary<string, SetOutcome>(StringComparer.Ordinal);
            using var handoff = new Operations.SetDoneHandoff(log, System.Console.Error.WriteLine);
            progress.Run(() =>
            {
                var processor = new SetProcessor(session.Context);
                Parallel.ForEach(todo, new ParallelOptions { MaxDegreeOfParallelism = options.Service.MaxParallelSets }, item =>
                {
                    var outcome = processor.Process(item.Set, incomplete: false, CancellationToken.None);
                    outcomes[item.Set.SetId] = outcome;
                    handoff.After(outcome, root, output);
                });
            });
            handoff.WaitAll(Timeout.InfiniteTimeSpan); // each is bounded by its own timeout
            int code = Summarize(session, sets, outcomes, started.Elapsed, output, req.Strict);
            log.Information("Run finished in {Seconds:0.0} s with exit code {Code}", started.Elapsed.TotalSeconds, code);
            return code;
        }
    }

    /// <summary>
    /// A pass over the whole root (not `rerun` of a part of it) retires the sets the ledger holds
    /// whose folders are gone: their outputs are removed and the ledger says retired.
    /// </summary>
    private static void RetireRemoved(RootSession session, IReadOnlyList<SetInputs> all, OneShotRequest req, ILogger log)
    {
        if (req.Within is not null || !session.ServedThisRootBefore)
        {
            return;
        }
        foreach (var id in SetRetirement.RetireMissing(session.Context, all.Select(s => s.SetId)))
        {
            System.Console.Out.WriteLine($"Set {id} retired: its folder was removed, so its outputs were removed");
            log.Information("Set {Set} retired: its folder was removed, so its outputs were removed", id);
        }
    }

    /// <summary>Binds and validates the settings and checks the folders; an exit code when something is wrong, else null.</summary>
    private static int? ReadSettings(OneShotRequest req, out SeamwrightOptions options, out RootSettings root)
    {
        options = null!;
        root = null!;
        try
        {
            options = SettingsLoader.Bind(SettingsLoader.Build(req.ConfigFile, req.Overrides));
        }
        catch (SettingsException e)
        {
            System.Console.Error.WriteLine("seamwright: " + e.Message);
            return ExitCodes.BadArguments;
        }
        if (!Directory.Exists(req.Folder))
        {
            System.Console.Error.WriteLine($"seamwright: the folder {req.Folder} does not exist");
            return ExitCodes.BadArguments;
        }
        root = options.RootFor(req.Folder, req.Output is null ? null : Path.GetFullPath(req.Output));
        if (IsUnder(Path.GetFullPath(req.Folder), root.EffectiveOutput))
        {
            System.Console.Error.WriteLine($"seamwright: the output folder {root.EffectiveOutput} cannot contain the input folder");
            return ExitCodes.BadArguments;
        }
        return null;
    }

    /// <summary>The sets that must be (re)done, with why in words (all of them when forced).</summary>
    private static List<(SetInputs Set, string Why)> ToRedo(RootSession session, IReadOnlyList<SetInputs> sets, bool force)
    {
        var todo = new List<(SetInputs Set, string Why)>();
        foreach (var s in sets)
        {
            string? why = force ? "forced" : WhyRedo(session.Context, s);
            if (why is not null)
            {
                todo.Add((s, why));
            }
        }
        return todo;
    }

    /// <summary>
    /// `rerun --dry-run`: reads the ledger without taking the output root's lock (so it works while
    /// `watch` serves it) and writes nothing. Exit 0 when nothing would be redone, 3 when something would.
    /// </summary>
    private static int DryRun(OneShotRequest req, SeamwrightOptions options, RootSettings root, IPairEngine engine)
    {
        string output = root.EffectiveOutput;
        var catalog = new SetCatalog(root, options);
        var all = catalog.Discover();
        var sets = req.Within is null ? all : all.Where(s => InScope(catalog, s, req.Within)).ToList();
        if (req.Within is not null && sets.Count == 0)
        {
            System.Console.Error.WriteLine($"seamwright: no set found under {req.Within}");
            return ExitCodes.BadArguments;
        }
        StateStore? store = null;
        try
        {
            store = StateStore.Open(output, options.State, readOnly: true);
        }
        catch (FileNotFoundException)
        {
            // nothing processed yet: every set would be done
        }
        using (store)
        {
            var todo = sets.Select(s => (Set: s, Why: req.Force ? "forced"
                    : store is null ? "never processed" : WhyRedo(store, output, p => ProcessingContext.Fingerprint(options, engine, p), s)))
                .Where(t => t.Why is not null).ToList();
            System.Console.Out.WriteLine(todo.Count == 0
                ? $"Nothing would be redone: all {sets.Count} sets are up to date."
                : $"{todo.Count} of {sets.Count} sets would be redone:");
            var ctx = store is null ? null : PreviewContext(output, options, engine, store);
            foreach (var (s, why) in todo)
            {
                System.Console.Out.WriteLine($"  {s.SetId}\t{why}" + (ctx is null ? "" : PairsWouldBeEstimated(ctx, s)));
            }
            return todo.Count == 0 ? ExitCodes.Ok : ExitCodes.FinishedWithProblems;
        }
    }

    /// <summary>A context for reading the caches only: the output root is not locked and nothing is processed (the confidence log is only opened, under its own file lock).</summary>
    private static ProcessingContext PreviewContext(string output, SeamwrightOptions options, IPairEngine engine, StateStore store) => new()
    {
        OutputRoot = output,
        Options = options,
        Store = store,
        Log = new ConfidenceLog(output),
        Engine = engine,
        Cache = new FeatureCache(output, engine),
        Budget = new MemoryBudget((long)options.Service.MemoryBudgetMegabytes << 20),
        JobSlots = new SemaphoreSlim(1),
    };

    private static string PairsWouldBeEstimated(ProcessingContext ctx, SetInputs s)
    {
        var count = PairRedoPreview.Count(ctx, s);
        return $"; {count.ToEstimate} of {count.Planned} pairs would be estimated"
            + (count.NotAnalysed > 0 ? $" ({count.NotAnalysed} images not analysed yet)" : "");
    }

    /// <summary>Null when the set is up to date; otherwise why it must be (re)done, in words.</summary>
    public static string? WhyRedo(ProcessingContext ctx, SetInputs set)
    {
        ArgumentNullException.ThrowIfNull(ctx);
        return WhyRedo(ctx.Store, ctx.OutputRoot, ctx.FingerprintFor, set);
    }

    /// <summary>Null when the set is up to date by this ledger and fingerprint; otherwise why it must be (re)done.</summary>
    public static string? WhyRedo(StateStore store, string outputRoot, Func<string, string> fingerprintFor, SetInputs set)
    {
        ArgumentNullException.ThrowIfNull(store);
        ArgumentNullException.ThrowIfNull(fingerprintFor);
        ArgumentNullException.ThrowIfNull(set);
        var rec = store.GetSet(set.SetId);
        if (rec is null || rec.DoneRun is null)
        {
            return "never processed";
        }
        if (rec.State == SetStates.Failed)
        {
            return "the last run failed: " + rec.Reason;
        }
        string fingerprint = fingerprintFor(set.Profile);
        if (rec.Fingerprint != fingerprint)
        {
            return $"settings changed (fingerprint {rec.Fingerprint} -> {fingerprint})";
        }
        if (rec.Inputs != set.InputsDigest())
        {
            return "input files added, replaced or removed";
        }
        bool manifest = File.Exists(Path.Combine(OutputLayout.SetFolder(outputRoot, set.SetId), OutputLayout.ManifestName));
        return rec.State == SetStates.Done && manifest ? null : rec.State != SetStates.Done ? "the last run did not finish" : "its manifest is missing";
    }

    private static bool InScope(RootSession session, SetInputs set, string within) => InScope(session.Catalog, set, within);

    private static bool InScope(SetCatalog catalog, SetInputs set, string within)
    {
        string full = Path.GetFullPath(within).TrimEnd('/', '\\');
        if (full == catalog.RootPath)
        {
            return true;
        }
        string rel = catalog.RootRelative(full);
        return set.SetId == rel || set.SetId.StartsWith(rel + "/", StringComparison.Ordinal)
            || set.Files.Any(f => f.FullPath.StartsWith(full + Path.DirectorySeparatorChar, StringComparison.Ordinal));
    }

    internal static void Announce(RootSession session, ILogger log)
    {
        if (session.SweptTemporaries > 0)
        {
            log.Warning("Removed {Count} temporary files left by an interrupted run", session.SweptTemporaries);
        }
        if (session.RecoveredSets.Count > 0)
        {
            log.Warning("Resuming after an interruption: {Sets} sets had unfinished runs", session.RecoveredSets.Count);
        }
        if (session.Context.Log.DroppedBytes > 0)
        {
            log.Warning("Dropped a torn last line ({Bytes} bytes) from {Log}", session.Context.Log.DroppedBytes, session.Context.Log.Path);
        }
        if (session.OutputOnNetworkShare)
        {
            log.Warning("The output root {Output} is on a network share; the state database needs local disk to be safe", session.Context.OutputRoot);
            System.Console.Error.WriteLine($"warning: the output root {session.Context.OutputRoot} is on a network share; keep the state on local disk");
        }
    }

    /// <summary>
    /// The summary table of every set; the exit code reflects the sets processed in this run (3
    /// when one of them failed or has weak or rejected pairs, bad files or is incomplete).
    /// Unchanged sets are listed but counted only with <paramref name="strict"/>, so a nightly
    /// run over old bad files exits 0 once nothing changed.
    /// </summary>
    private static int Summarize(RootSession session, IReadOnlyList<SetInputs> sets, IReadOnlyDictionary<string, SetOutcome> outcomes, TimeSpan elapsed, string output, bool strict)
    {
        bool plain = System.Console.IsOutputRedirected;
        if (plain)
        {
            AnsiConsole.Profile.Width = 160; // a log file or pipe has no width; keep the table on one line per set
        }
        var table = new Table().Border(plain ? TableBorder.Ascii : TableBorder.Rounded)
            .AddColumn("Set").AddColumn("This run").AddColumn(new TableColumn("Run").RightAligned())
            .AddColumn(new TableColumn("Images").RightAligned()).AddColumn(new TableColumn("Pairs").RightAligned())
            .AddColumn(new TableColumn("Accepted").RightAligned()).AddColumn(new TableColumn("Weak").RightAligned())
            .AddColumn(new TableColumn("Rejected").RightAligned()).AddColumn(new TableColumn("Bad files").RightAligned());
        bool problems = false;
        foreach (var s in sets)
        {
            var rec = session.Context.Store.GetSet(s.SetId);
            var run = rec?.DoneRun is long id ? session.Context.Store.GetRun(id) : null;
            string what = outcomes.TryGetValue(s.SetId, out var o)
                ? o.Kind switch { SetOutcomeKind.Done => "processed", SetOutcomeKind.Changed => "changed, retry", _ => "FAILED" }
                : "unchanged";
            bool counted = o is not null || strict;
            if (counted && (o is { Kind: not SetOutcomeKind.Done } || rec?.State == SetStates.Failed))
            {
                problems = true;
            }
            var sum = run?.Summary;
            if (counted && (sum is null || sum.Weak + sum.Rejected + sum.BadFiles > 0 || sum.Incomplete))
            {
                problems = true;
            }
            table.AddRow(Markup.Escape(s.SetId), what, run?.RunId.ToString(System.Globalization.CultureInfo.InvariantCulture) ?? "-",
                N(sum?.Images), N(sum?.Pairs), N(sum?.Accepted), N(sum?.Weak), N(sum?.Rejected), N(sum?.BadFiles));
        }
        AnsiConsole.Write(table);
        System.Console.Out.WriteLine($"{outcomes.Count} sets processed, {sets.Count - outcomes.Count} unchanged, in {elapsed.TotalSeconds:0.0} s. Outputs in {output}");
        return problems ? ExitCodes.FinishedWithProblems : ExitCodes.Ok;
    }

    private static string N(int? v) => v?.ToString(System.Globalization.CultureInfo.InvariantCulture) ?? "-";

    private static bool IsUnder(string path, string folder) =>
        path.TrimEnd('/', '\\') == folder.TrimEnd('/', '\\') || path.StartsWith(folder.TrimEnd('/', '\\') + Path.DirectorySeparatorChar, StringComparison.Ordinal);
}
