using Seamwright.Host.Commands;

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
        try
        {
            return args[0] switch
            {
                "version" or "--version" => Version(),
                "estimate" => EstimateCommand.Run(rest, Console.Out, Console.Error),
                "pair" => PairCommand.Run(rest, Console.Out, Console.Error),
                "run" => RunCommand.Execute(rest),
                "watch" => WatchCommand.Execute(rest),
                "status" => StatusCommand.Execute(rest),
                "rerun" => RerunCommand.Execute(rest),
                "make-demo" => MakeDemoCommand.Run(rest),
                // Hidden: a decode worker process started by the supervisor (Supervision/WorkerPool.cs).
                "worker" => WorkerCommand.Run(rest),
                _ => Unknown(args[0]),
            };
        }
#pragma warning disable CA1031 // the last line of defence: any escaped error is fatal and exits non-zero
        catch (Exception e)
#pragma warning restore CA1031
        {
            Console.Error.WriteLine("seamwright: fatal error: " + e);
            return ExitCodes.Fatal;
        }
    }

    private const string Usage =
        $"""
        seamwright: prepares overlapping images for stitching.

        Commands:
          {RunCommand.Usage}
                                      process every set of FOLDER once, then exit
          {WatchCommand.Usage}
                                      the service: watch the roots and process sets when complete
          {StatusCommand.Usage}
                                      sets done, pending, stale and failed, bad files with reasons
          {RerunCommand.Usage}
                                      redo the sets whose settings or inputs changed (--dry-run lists them)
          estimate FILE [options]     one pairwise transform from a match file (x1,y1,x2,y2 per line);
                                      options: --model homography|affine|similarity|translation,
                                      --threshold PX, --seed N, --no-refine, --size-a WxH,
                                      --size-b WxH, --json
          pair IMAGE_A IMAGE_B [options]
                                      one pairwise transform from two images (full-resolution
                                      pixels); options: --model M, --threshold PX, --seed N,
                                      --mask-a FILE, --mask-b FILE (mask image or .txt of
                                      'x y width height' rectangles), --json
          make-demo DIR               write the demo sets (images + _truth.json) into DIR
          version                     print the tool version

        Settings: config/appsettings.json beside the executable (or --config FILE), environment
        variables (Seamwright__Engine=...), and overrides such as --Seamwright:Service:StableSeconds=5.
        Exit codes: 0 all pairs accepted, 3 weak or rejected pairs or bad files, 2 bad arguments or
        settings, 1 fatal error; status: 0 service running and healthy, 4 no service running,
        5 running but unhealthy or not responding.
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
