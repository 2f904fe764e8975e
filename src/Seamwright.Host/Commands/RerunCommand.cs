using Seamwright.Host.Configuration;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Commands;

/// <summary>
/// <c>seamwright rerun SET_OR_ROOT [--dry-run] [--force] [--root DIR] [--output DIR] [--config FILE]</c>: redoes
/// exactly the sets under the path whose settings fingerprint or inputs changed since their last
/// run (all of them with --force); --dry-run lists them with the reason and changes nothing (it
/// only reads, so it also works while `watch` serves the output root; exit 0 when nothing would
/// be redone, 3 when something would). The watched root is --root, else the configured root
/// containing the path, else the root an output root records as the one it serves
/// (<see cref="WatchedRootRecord"/>, found from the path or one of its parents), else the path
/// itself when it holds set folders.
/// </summary>
internal static class RerunCommand
{
    public const string Usage = "rerun SET_OR_ROOT [--dry-run] [--force] [--root DIR] [--output DIR] [--config FILE]";

    public static int Execute(string[] args)
    {
        CommandArgs a;
        SeamwrightOptions options;
        try
        {
            a = CommandArgs.Parse(args, ["--output", "--config", "--root"], ["--dry-run", "--force"]);
            if (a.Positional.Count != 1)
            {
                return RunCommand.Bad("rerun needs exactly one SET_OR_ROOT: seamwright " + Usage);
            }
            options = SettingsLoader.Bind(SettingsLoader.Build(a.Value("--config"), a.Overrides.ToArray()));
        }
        catch (SettingsException e)
        {
            return RunCommand.Bad(e.Message);
        }
        string target = Trim(Path.GetFullPath(a.Positional[0]));
        if (!Directory.Exists(target))
        {
            return RunCommand.Bad($"{target} does not exist");
        }
        string? output = a.Value("--output") is { } o ? Path.GetFullPath(o) : null;
        string? root = a.Value("--root") is { } given ? Trim(Path.GetFullPath(given)) : ResolveRoot(options, target, output);
        if (root is null)
        {
            return RunCommand.Bad($"cannot tell which watched root {target} belongs to: no configured root contains it and no output root "
                + "records serving it or a parent; give --root ROOT (the folder `watch` serves) or --output DIR");
        }
        return OneShot.Execute(new OneShotRequest(root, a.Value("--output"), a.Value("--config"), a.Overrides.ToArray(),
            target == root ? null : target, a.Flag("--dry-run"), a.Flag("--force")));
    }

    /// <summary>The watched root a path belongs to, or null when nothing says (a set folder must never become a root of its own).</summary>
    internal static string? ResolveRoot(SeamwrightOptions options, string target, string? output)
    {
        ArgumentNullException.ThrowIfNull(options);
        var configured = options.Roots
            .Where(r => !string.IsNullOrWhiteSpace(r.Path))
            .Select(r => Trim(Path.GetFullPath(r.Path)))
            .Where(r => IsSameOrUnder(target, r))
            .OrderByDescending(r => r.Length)
            .FirstOrDefault();
        if (configured is not null)
        {
            return configured;
        }
        if (output is not null && WatchedRootRecord.Read(output) is { } served && IsSameOrUnder(target, served))
        {
            return served;
        }
        for (string? candidate = target; candidate is not null; candidate = Path.GetDirectoryName(candidate))
        {
            string candidateOutput = output ?? options.RootFor(candidate, null).EffectiveOutput;
            if (WatchedRootRecord.Read(candidateOutput) is { } recorded && Trim(recorded) == Trim(candidate))
            {
                return Trim(candidate);
            }
        }
        // Never served: the path is a root only when it holds folders (sets); a folder of images alone would become set ".".
        bool holdsFolders = Directory.EnumerateDirectories(target).Any(d => !Path.GetFileName(d).StartsWith('.'));
        return holdsFolders ? target : null;
    }

    private static bool IsSameOrUnder(string path, string root) =>
        path == root || path.StartsWith(root + Path.DirectorySeparatorChar, StringComparison.Ordinal);

    private static string Trim(string p) => p.Length > 1 ? p.TrimEnd('/', '\\') : p;
}
