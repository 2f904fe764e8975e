using System.Globalization;
using Seamwright.Host.Supervision;

namespace Seamwright.Host.Commands;

/// <summary>
/// Hidden command `seamwright worker --memory-mb N --timeout-s T`: a decode worker started by the supervisor
/// (<see cref="WorkerPool"/>). It caps its own address space, then answers framed requests on
/// stdin with framed replies on stdout until stdin closes. Not for interactive use.
/// </summary>
internal static class WorkerCommand
{
    public static int Run(string[] args)
    {
        long budget = 512L << 20;
        double timeoutSeconds = 120;
        for (int i = 0; i < args.Length; i++)
        {
            if (args[i] == "--memory-mb" && i + 1 < args.Length
                && long.TryParse(args[i + 1], NumberStyles.None, CultureInfo.InvariantCulture, out long mb) && mb > 0)
            {
                budget = mb << 20;
                i++;
            }
            else if (args[i] == "--timeout-s" && i + 1 < args.Length
                && double.TryParse(args[i + 1], NumberStyles.Float, CultureInfo.InvariantCulture, out double s) && s > 0)
            {
                timeoutSeconds = s;
                i++;
            }
            else
            {
                Console.Error.WriteLine($"seamwright worker: unexpected argument '{args[i]}'");
                return ExitCodes.BadArguments;
            }
        }

        // The protocol owns stdout; anything else printed goes to stderr.
        using Stream output = Console.OpenStandardOutput();
        using Stream input = Console.OpenStandardInput();
        Console.SetOut(Console.Error);

        string limits = LinuxAddressSpaceLimit.Apply(budget);
        var faults = WorkerTestFaults.FromEnvironment();
        if (faults is not null)
        {
            Console.Error.WriteLine($"seamwright worker: TEST FAULT HOOKS ACTIVE ({faults.Count} files)");
        }
        // Allocator limit: half the budget for one buffer, the rest for the decoder's other planes and the features.
        var job = new WorkerJobs(new EngineJob(budget / 2), new DecodeJob(budget / 2, TimeSpan.FromSeconds(timeoutSeconds)),
            new PreviewJob(budget / 2, TimeSpan.FromSeconds(timeoutSeconds)));
        try
        {
            return Serve(input, output, job, faults, limits).GetAwaiter().GetResult();
        }
        catch (Exception ex) when (ex is IOException or InvalidDataException or System.Text.Json.JsonException)
        {
            // A broken pipe or a corrupt frame: the supervisor is gone or confused; it replaces us.
            Console.Error.WriteLine("seamwright worker: protocol failure: " + ex.Message);
            return ExitCodes.Fatal;
        }
    }

    private static async Task<int> Serve(Stream input, Stream output, IWorkerJob job, WorkerTestFaults? faults, string limits)
    {
        await WorkerProtocol.WriteAsync(output, new WorkerHello(WorkerProtocol.Version, Environment.ProcessId, limits), CancellationToken.None);
        while (await WorkerProtocol.ReadAsync<WorkerRequest>(input, CancellationToken.None) is { } request)
        {
            WorkerReply reply;
            try
            {
                faults?.Apply(request.Path);
                reply = job.Run(request);
            }
            catch (Exception ex) when (ex is OutOfMemoryException or SixLabors.ImageSharp.Memory.InvalidMemoryOperationException)
            {
                // The decoder asked for more than the budget; the file is bad, and this process
                // may hold fragments of a huge heap: reply, then let the supervisor replace us.
                reply = new WorkerReply(request.Id, false, "decoder needed more memory than the per-job cap: " + ex.Message, 0, 0, null, null, 0, true, 0, "MemoryLimit");
            }
            catch (Exception ex)
            {
                reply = new WorkerReply(request.Id, false, ReasonFor(ex), 0, 0, null, null, 0, false);
            }
            using (var self = System.Diagnostics.Process.GetCurrentProcess())
            {
                reply = reply with { PeakWorkingSetBytes = self.PeakWorkingSet64 };
            }
            await WorkerProtocol.WriteAsync(output, reply, CancellationToken.None);
            if (reply.Recycle)
            {
                return ExitCodes.Ok;
            }
        }
        return ExitCodes.Ok;
    }

    private static string ReasonFor(Exception ex) => ex switch
    {
        SixLabors.ImageSharp.UnknownImageFormatException => "not a recognised image: " + ex.Message,
        SixLabors.ImageSharp.InvalidImageContentException => "corrupt image data: " + ex.Message,
        SixLabors.ImageSharp.ImageFormatException => "unreadable image: " + ex.Message,
        NotSupportedException => "unsupported image variant: " + ex.Message,
        IOException or UnauthorizedAccessException => "cannot read file: " + ex.Message,
        _ => $"decoder failed ({ex.GetType().Name}): {ex.Message}",
    };
}
