using Seamwright.Host.Configuration;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Commands;

/// <summary>
/// <c>seamwright rerun SET_OR_ROOT [--dry-run] [--force] [--output DIR] [--config FILE]</c>: redoes
/// exactly the sets under the path whose settings fingerprint or inputs changed since their last
/// run (all of them with --force); --dry-run lists them with the reason and changes nothing.
/// The root is --root, else the configured root containing the path, else the path itself.
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
        string target = Path.GetFullPath(a.Positional[0]).TrimEnd('/', '\\');
        var configured = options.Roots
            .Where(r => !string.IsNullOrWhiteSpace(r.Path))
            .Select(r => Path.GetFullPath(r.Path).TrimEnd('/', '\\'))
            .Where(r => target == r || target.StartsWith(r + Path.DirectorySeparatorChar, StringComparison.Ordinal))
            .OrderByDescending(r => r.Length)
            .FirstOrDefault();
        string root = a.Value("--root") is { } given ? Path.GetFullPath(given).TrimEnd('/', '\\') : configured ?? target;
        return OneShot.Execute(new OneShotRequest(root, a.Value("--output"), a.Value("--config"), a.Overrides.ToArray(),
            target == root ? null : target, a.Flag("--dry-run"), a.Flag("--force")));
    }
}
