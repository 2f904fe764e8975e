namespace Seamwright.Host;

/// <summary>Dispatches the first argument to a command. Each command lives in Commands/.</summary>
internal static class CommandLine
{
    public static int Run(string[] args)
    {
        if (args.Length == 0 || args[0] is "-h" or "--help" or "help")
        {
            Console.Out.WriteLine(Usage);
            return args.Length == 0 ? ExitCodes.BadArguments : ExitCodes.Ok;
        }
        var rest = args[1..];
        return args[0] switch
        {
            "version" or "--version" => Version(),
            "estimate" => Commands.EstimateCommand.Run(rest, Console.Out, Console.Error),
            "make-demo" => Commands.MakeDemoCommand.Run(rest),
            "pair" => Commands.PairCommand.Run(rest, Console.Out, Console.Error),
            _ => Unknown(args[0]),
        };
    }

    private const string Usage =
        """
        seamwright: prepares overlapping images for stitching.

        Commands:
          version                     print the tool and algorithm versions
          estimate FILE [options]     one pairwise transform from a match file (x1,y1,x2,y2 per line);
                                      options: --model homography|affine|similarity|translation,
                                      --threshold PX, --seed N, --no-refine, --size-a WxH,
                                      --size-b WxH, --json
          make-demo DIR               write the demo sets (images + _truth.json) into DIR
          pair IMAGE_A IMAGE_B [options]
                                      one pairwise transform from two images (full-resolution
                                      pixels); options: --model M, --threshold PX, --seed N,
                                      --mask-a FILE, --mask-b FILE (mask image or .txt of
                                      'x y width height' rectangles), --json
        """;

    private static int Version()
    {
        Console.Out.WriteLine(typeof(CommandLine).Assembly.GetName().Version?.ToString(3));
        return ExitCodes.Ok;
    }

    private static int Unknown(string command)
    {
        Console.Error.WriteLine($"seamwright: unknown command '{command}' (try 'seamwright help')");
        return ExitCodes.BadArguments;
    }
}
