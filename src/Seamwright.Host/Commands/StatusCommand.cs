using System.Globalization;
using Seamwright.Host.Configuration;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Host.Commands;

/// <summary>
/// <c>seamwright status [PATH] [--output DIR] [--config FILE]</c>: what the ledger of an output root
/// says: sets done, pending, stale, failed (with reasons), and bad files with reasons. PATH is an
/// output root or a watched root; without it, every configured root. Reads only; works while the
/// service runs.
/// </summary>
internal static class StatusCommand
{
    public const string Usage = "status [PATH] [--output DIR] [--config FILE]";

    public static int Execute(string[] args)
    {
        CommandArgs a;
        SeamwrightOptions options;
        try
        {
            a = CommandArgs.Parse(args, ["--output", "--config"], []);
            options = SettingsLoader.Bind(SettingsLoader.Build(a.Value("--config"), a.Overrides.ToArray()));
        }
        catch (SettingsException e)
        {
            return RunCommand.Bad(e.Message);
        }
        var outputs = new List<string>();
        if (a.Positional.Count > 1)
        {
            return RunCommand.Bad("status takes at most one PATH: seamwright " + Usage);
        }
        if (a.Positional.Count == 1)
        {
            string p = Path.GetFullPath(a.Positional[0]);
            outputs.Add(File.Exists(Path.Combine(p, StateStore.StateFolder, StateStore.DatabaseName))
                ? p
                : options.RootFor(p, a.Value("--output") is { } o ? Path.GetFullPath(o) : null).EffectiveOutput);
        }
        else
        {
            outputs.AddRange(options.Roots.Select(r => r.EffectiveOutput));
        }
        if (outputs.Count == 0)
        {
            return RunCommand.Bad("no PATH given and no roots configured: seamwright " + Usage);
        }
        int code = ExitCodes.Ok;
        foreach (var output in outputs)
        {
            code = Math.Max(code, Print(output));
        }
        return code;
    }

    private static int Print(string output)
    {
        StateStore store;
        try
        {
            store = StateStore.Open(output, readOnly: true);
        }
        catch (FileNotFoundException)
        {
            System.Console.Out.WriteLine($"{output}: no Seamwright state (nothing processed yet)");
            return ExitCodes.Ok;
        }
        using (store)
        {
            var sets = store.Sets();
            var runs = store.Runs();
            var files = store.Files();
            var w = System.Console.Out;
            w.WriteLine($"Output root {output}");
            w.WriteLine($"  sets: {sets.Count} ({Count(sets, SetStates.Done)} done, {Count(sets, SetStates.Pending)} pending, {Count(sets, SetStates.Running)} running, {Count(sets, SetStates.Stale)} stale, {Count(sets, SetStates.Failed)} failed)");
            int incomplete = sets.Count(s => s.State == SetStates.Done && s.Incomplete);
            if (incomplete > 0)
            {
                w.WriteLine($"  {incomplete} done sets were processed incomplete (maximum wait reached)");
            }
            var live = files.Where(f => f.State != "removed").ToList();
            w.WriteLine($"  files: {live.Count} ({live.Count(f => f.State == "analysed")} analysed, {live.Count(f => f.State == "bad")} bad, {live.Count(f => f.State == "seen")} waiting)");
            var done = runs.Where(r => r.State == "done" && r.Summary is not null).ToList();
            w.WriteLine($"  runs: {runs.Count} ({done.Count} finished, {runs.Count(r => r.State == "abandoned")} abandoned, {runs.Count(r => r.State == "running")} running)");
            var current = sets.Where(s => s.DoneRun is not null).Select(s => runs.FirstOrDefault(r => r.RunId == s.DoneRun)?.Summary).OfType<RunSummary>().ToList();
            w.WriteLine($"  pairs in the latest runs: {current.Sum(s => s.Pairs)} ({current.Sum(s => s.Accepted)} accepted, {current.Sum(s => s.Weak)} weak, {current.Sum(s => s.Rejected)} rejected)");
            foreach (var s in sets.Where(s => s.State is SetStates.Pending or SetStates.Stale or SetStates.Running))
            {
                w.WriteLine($"  {s.State,-8} {s.SetId}" + (s.Reason is null ? "" : "  (" + s.Reason + ")"));
            }
            foreach (var s in sets.Where(s => s.State == SetStates.Failed))
            {
                w.WriteLine($"  failed   {s.SetId}: {s.Reason}");
            }
            foreach (var f in live.Where(f => f.State == "bad"))
            {
                w.WriteLine($"  bad file {f.Path}: {f.Reason}");
            }
            if (done.Count > 0)
            {
                var last = done[^1];
                w.WriteLine($"  last finished run: {last.RunId} of {last.SetId} at {last.FinishedUtc?.ToString("u", CultureInfo.InvariantCulture)}");
            }
        }
        // The running service's live figures (queue, latency, rates, quarantine, health), from the
        // heartbeat file it rewrites while healthy; stale after three missed beats.
        var heartbeat = Operations.HeartbeatFile.TryRead(Path.Combine(output, StateStore.StateFolder, Operations.HeartbeatFile.FileName));
        double beat = heartbeat is { HeartbeatSeconds: > 0 } ? heartbeat.HeartbeatSeconds : 10;
        System.Console.Out.Write(Operations.StatusReport.Render(heartbeat, DateTimeOffset.UtcNow, TimeSpan.FromSeconds(3 * beat)));
        return ExitCodes.Ok;
    }

    private static int Count(IReadOnlyList<SetRecord> sets, string state) => sets.Count(s => s.State == state);
}
