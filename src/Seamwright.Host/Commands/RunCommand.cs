using Seamwright.Host.Configuration;

namespace Seamwright.Host.Commands;

/// <summary><c>seamwright run FOLDER [--output DIR] [--config FILE]</c>: processes every set of FOLDER once.</summary>
internal static class RunCommand
{
    public const string Usage = "run FOLDER [--strict] [--output DIR] [--config FILE]";

    public static int Execute(string[] args)
    {
        CommandArgs a;
        try
        {
            a = CommandArgs.Parse(args, ["--output", "--config"], ["--strict"]);
        }
        catch (SettingsException e)
        {
            return Bad(e.Message);
        }
        if (a.Positional.Count != 1)
        {
            return Bad("run needs exactly one FOLDER: seamwright " + Usage);
        }
        return OneShot.Execute(new OneShotRequest(a.Positional[0], a.Value("--output"), a.Value("--config"), a.Overrides.ToArray(), null, false, false, a.Flag("--strict")));
    }

    internal static int Bad(string message)
    {
        System.Console.Error.WriteLine("seamwright: " + message);
        return ExitCodes.BadArguments;
    }
}
