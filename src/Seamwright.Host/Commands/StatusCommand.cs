using System.Globalization;
using System.Text.Json;
using System.Text.Json.Serialization;
using Seamwright.Host.Configuration;
using Seamwright.Pipeline.Settings;
using Seamwright.Pipeline.State;

namespace Seamwright.Host.Commands;

/// <summary>
/// <c>seamwright status [PATH] [--json] [--output DIR] [--config FILE]</c>: what the ledger of an
/// output root says (sets done, pending, stale, failed with reasons; bad files with reasons) and
/// the state of its service from the heartbeat file (running, stopped, not-responding,
/// not-started). PATH is an output root or a watched root; without it, every configured root.
/// Reads only; works while the service runs. Exit code: 0 running and healthy, 4 no service
/// running, 5 running but unhealthy or not responding, 2 bad arguments or a PATH that does not
/// exist (the worst over the roots).
/// </summary>
internal static class StatusCommand
{
    public const string Usage = "status [PATH] [--json] [--output DIR] [--config FILE]";

    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web)
    {
        WriteIndented = true,
        DefaultIgnoreCondition = JsonIgnoreCondition.Never,
    };

    public static int Execute(string[] args)
    {
        CommandArgs a;
        SeamwrightOptions options;
        try
        {
            a = CommandArgs.Parse(args, ["--output", "--config"], ["--json"]);
            options = SettingsLoader.Bind(SettingsLoader.Build(a.Value("--config"), a.Overrides.ToArray()));
        }
        catch (SettingsException e)
        {
            return RunCommand.Bad(e.Message);
        }
        if (a.Positional.Count > 1)
        {
            return RunCommand.Bad("status takes at most one PATH: seamwright " + Usage);
        }
        var outputs = new List<string>();
        if (a.Positional.Count == 1)
        {
            string p = Path.GetFullPath(a.Positional[0]);
            if (!Directory.Exists(p))
            {
                return RunCommand.Bad($"{p} does not exist (give an output root or a watched root)");
            }
            outputs.Add(File.Exists(Path.Combine(p, StateStore.StateFolder, StateStore.DatabaseName))
                || File.Exists(Path.Combine(p, StateStore.StateFolder, Operations.HeartbeatFile.FileName))
                || File.Exists(RootIdentity.PathOf(p))
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
        var now = DateTimeOffset.UtcNow;
        List<RootStatus> statuses;
        try
        {
            statuses = outputs.Select(o => RootStatus.Read(o, now, options.State)).ToList();
        }
        catch (System.Data.Common.DbException e)
        {
            System.Console.Error.WriteLine("seamwright: the shared ledger cannot be reached: " + e.Message);
            return ExitCodes.Fatal;
        }
        if (a.Flag("--json"))
        {
            // One object for one root; several roots: {"schema", "roots": [...]}.
            object doc = statuses.Count == 1 ? statuses[0] : new { schema = RootStatus.SchemaId, roots = statuses };
            System.Console.Out.WriteLine(JsonSerializer.Serialize(doc, Json));
        }
        else
        {
            foreach (var s in statuses)
            {
                System.Console.Out.Write(Text(s, now));
            }
        }
        return statuses.Max(s => s.ExitCode);
    }

    /// <summary>The text form of one root's status.</summary>
    internal static string Text(RootStatus s, DateTimeOffset now)
    {
        var w = new StringWriter(CultureInfo.InvariantCulture);
        if (!s.Processed)
        {
            w.WriteLine($"{s.OutputRoot}: no Seamwright state (nothing processed yet)");
        }
        else
        {
            w.WriteLine($"Output root {s.OutputRoot}");
            var c = s.Sets;
            w.WriteLine($"  sets: {c.Total} ({c.Done} done, {c.Pending} pending, {c.Running} running, {c.Stale} stale, {c.Failed} failed, {c.Retired} retired)");
            if (c.Incomplete > 0)
            {
                w.WriteLine($"  {c.Incomplete} done sets were processed incomplete (maximum wait reached)");
            }
            w.WriteLine($"  files: {s.Files.Total} ({s.Files.Analysed} analysed, {s.Files.Bad} bad, {s.Files.Waiting} waiting)");
            w.WriteLine($"  runs: {s.Runs.Total} ({s.Runs.Finished} finished, {s.Runs.Abandoned} abandoned, {s.Runs.Running} running)");
            w.WriteLine($"  pairs in the latest runs: {s.Pairs.Total} ({s.Pairs.Accepted} accepted, {s.Pairs.Weak} weak, {s.Pairs.Rejected} rejected)");
            foreach (var x in s.SetsNotDone)
            {
                w.WriteLine(x.State == SetStates.Failed
                    ? $"  failed   {x.Name}: {x.Reason}"
                    : $"  {x.State,-8} {x.Name}" + (x.Reason is null ? "" : "  (" + x.Reason + ")"));
            }
            foreach (var f in s.BadFiles)
            {
                w.WriteLine($"  bad file {f.Name}: {f.Reason}");
            }
            if (s.LastFinishedRun is { } last)
            {
                w.WriteLine($"  last finished run: {last.RunId} of {last.Set} at {last.FinishedUtc?.ToString("u", CultureInfo.InvariantCulture)}"
                    + (last.Node is null ? "" : " by node " + last.Node));
            }
            foreach (var n in s.Nodes ?? [])
            {
                string sets = n.Sets.Count == 0 ? "no set" : string.Join(", ", n.Sets);
                w.WriteLine($"  node {n.Node,-16} {(n.Alive ? "alive" : "SILENT"),-6} last heartbeat {n.LastHeartbeatUtc:u} ({n.HeartbeatAgeSeconds:0} s ago), process {n.ProcessId}, working on: {sets}");
            }
        }
        w.Write(Operations.StatusReport.Render(s.Service.State, s.Service.Note, s.Service.Figures, now));
        return w.ToString();
    }
}
