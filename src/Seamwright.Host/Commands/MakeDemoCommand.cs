using System.Diagnostics;
using Seamwright.Pipeline.Demo;

namespace Seamwright.Host.Commands;

/// <summary>
/// <c>seamwright make-demo DIR</c>: writes the invented demo sets with their ground truth into
/// DIR (one folder per set). The output is byte-identical on every run.
/// </summary>
internal static class MakeDemoCommand
{
    public const string Usage = "make-demo DIR                write the demo sets (images + _truth.json) into DIR";

    public static int Run(string[] args)
    {
        if (args.Length != 1 || args[0].StartsWith('-'))
        {
            Console.Error.WriteLine("seamwright make-demo: expected one argument, the output folder (usage: seamwright make-demo DIR)");
            return ExitCodes.BadArguments;
        }
        string root = Path.GetFullPath(args[0]);
        var watch = Stopwatch.StartNew();
        try
        {
            Directory.CreateDirectory(root);
            var files = DemoGenerator.Generate(root);
            foreach (var set in DemoGenerator.Sets)
            {
                Console.Out.WriteLine($"{set.Name}: {set.Images.Count} images, reference {set.Reference}. {set.Description}");
            }
            Console.Out.WriteLine($"Wrote {files.Count} files to {root} in {watch.Elapsed.TotalSeconds:0.0} s.");
            return ExitCodes.Ok;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            Console.Error.WriteLine($"seamwright make-demo: cannot write to {root}: {e.Message}");
            return ExitCodes.Fatal;
        }
    }
}
