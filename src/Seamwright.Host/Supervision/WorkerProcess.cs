using System.Diagnostics;
using System.Globalization;
using System.Text;

namespace Seamwright.Host.Supervision;

/// <summary>
/// One worker child process seen from the supervisor: starts it with the memory settings in its
/// environment, sends one job at a time, and while waiting polls its working set and the clock,
/// killing it when either limit is passed. A killed or crashed worker is not reused.
/// </summary>
internal sealed class WorkerProcess : IAsyncDisposable
{
    private readonly Process _process;
    private readonly Stream _input;
    private readonly Stream _output;
    private readonly StringBuilder _stderrTail = new();
    private string? _crashLine;
    private readonly object? _job;
    private bool _broken;

    private WorkerProcess(Process process, object? job)
    {
        _process = process;
        _job = job;
        _input = process.StandardInput.BaseStream;
        _output = process.StandardOutput.BaseStream;
        process.ErrorDataReceived += (_, e) =>
        {
            if (e.Data is null)
            {
                return;
            }
            lock (_stderrTail)
            {
                // The runtime's own crash line says most; it can scroll out of the tail behind a long stack.
                string line = e.Data.Trim();
                if (_crashLine is null && IsTelling(line))
                {
                    _crashLine = line;
                }
                else if (_crashLine is "Process terminated." && line.Length > 0)
                {
                    _crashLine += " " + line; // FailFast puts its message on the next line
                }
                _stderrTail.AppendLine(e.Data);
                if (_stderrTail.Length > 4096)
                {
                    _stderrTail.Remove(0, _stderrTail.Length - 4096);
                }
            }
        };
        process.BeginErrorReadLine();
    }

    public int ProcessId => _process.Id;

    /// <summary>What the worker reported about its own limits at start.</summary>
    public string Limits { get; private set; } = "";

    /// <summary>False once the worker was killed, crashed, asked to be recycled or broke the protocol.</summary>
    public bool IsUsable => !_broken && !_process.HasExited;

    public static async Task<WorkerProcess> StartAsync(WorkerLaunch launch, SupervisionOptions options,
        IReadOnlyDictionary<string, string>? environment, CancellationToken cancellationToken)
    {
        var start = new ProcessStartInfo(launch.FileName)
        {
            RedirectStandardInput = true,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
            CreateNoWindow = true,
        };
        foreach (string a in launch.Arguments)
        {
            start.ArgumentList.Add(a);
        }
        start.ArgumentList.Add("--memory-mb");
        start.ArgumentList.Add(options.MemoryCapMegabytes.ToString(CultureInfo.InvariantCulture));
        start.ArgumentList.Add("--timeout-s");
        start.ArgumentList.Add(options.JobTimeoutSeconds.ToString(CultureInfo.InvariantCulture));
        // Half the cap for the managed heap (ImageSharp keeps large pixel buffers in unmanaged
        // memory, bounded by its allocator limit); the address-space limit bounds the rest.
        start.Environment["DOTNET_GCHeapHardLimit"] = "0x" + (options.MemoryCapBytes / 2).ToString("X", CultureInfo.InvariantCulture);
        start.Environment["DOTNET_gcConcurrent"] = "0";
        start.Environment["DOTNET_gcServer"] = "0";
        // glibc reserves a 64 MiB arena per thread by default; that address space would count
        // against the worker's RLIMIT_AS without ever being used.
        start.Environment["MALLOC_ARENA_MAX"] = "2";
        // Only the test fault hooks may pass through; never inherit them by accident.
        start.Environment.Remove("SEAMWRIGHT_TEST_HOOKS");
        start.Environment.Remove("SEAMWRIGHT_TEST_FAULTS");
        if (environment is not null)
        {
            foreach (var (key, value) in environment)
            {
                start.Environment[key] = value;
            }
        }

        var process = Process.Start(start) ?? throw new WorkerStartException($"could not start {launch.FileName}");
        object? job = null;
        if (OperatingSystem.IsWindows())
        {
            var windowsJob = new WindowsJobObject(options.MemoryCapBytes);
            windowsJob.Assign(process);
            job = windowsJob;
        }
        var worker = new WorkerProcess(process, job);
        try
        {
            using var timeout = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
            timeout.CancelAfter(TimeSpan.FromSeconds(60));
            var hello = await WorkerProtocol.ReadAsync<WorkerHello>(worker._output, timeout.Token)
                ?? throw new WorkerStartException("worker exited before it said hello: " + worker.StderrTail());
            if (hello.Protocol != WorkerProtocol.Version)
            {
                throw new WorkerStartException($"worker speaks protocol {hello.Protocol}, expected {WorkerProtocol.Version}");
            }
            worker.Limits = hello.Limits;
            return worker;
        }
        catch (Exception ex)
        {
            await worker.DisposeAsync();
            if (ex is OperationCanceledException && cancellationToken.IsCancellationRequested)
            {
                throw;
            }
            throw ex as WorkerStartException ?? new WorkerStartException("worker did not start: " + ex.Message, ex);
        }
    }

    public async Task<JobResult> RunAsync(WorkerRequest request, SupervisionOptions options, CancellationToken cancellationToken)
    {
        if (!IsUsable)
        {
            throw new InvalidOperationException("worker is not usable");
        }
        long peak = 0;
        var clock = Stopwatch.StartNew();
        try
        {
            await WorkerProtocol.WriteAsync(_input, request, cancellationToken);
        }
        catch (IOException ex)
        {
            return await CrashedAsync("could not send the job: " + ex.Message, peak);
        }
        var replyTask = WorkerProtocol.ReadAsync<WorkerReply>(_output, CancellationToken.None);
        var poll = TimeSpan.FromMilliseconds(options.MemoryPollMilliseconds);
        while (true)
        {
            await Task.WhenAny(replyTask, Task.Delay(poll, cancellationToken)).ConfigureAwait(false);
            if (replyTask.IsCompleted)
            {
                return await FinishAsync(request, replyTask, peak);
            }
            if (cancellationToken.IsCancellationRequested)
            {
                await KillAsync();
                cancellationToken.ThrowIfCancellationRequested();
            }
            long workingSet = WorkingSet();
            peak = Math.Max(peak, workingSet);
            if (_process.HasExited)
            {
                // The pipe closes with the process; the reader then ends with whatever came first.
                return await FinishAsync(request, replyTask, peak);
            }
            if (workingSet > options.MemoryCapBytes)
            {
                await KillAsync();
                return new JobResult(JobEnd.OverMemory,
                    string.Create(CultureInfo.InvariantCulture, $"worker killed: memory (working set) {workingSet >> 20} MiB over the {options.MemoryCapMegabytes} MiB cap"), null, peak);
            }
            if (clock.Elapsed > options.JobTimeout)
            {
                await KillAsync();
                return new JobResult(JobEnd.TimedOut,
                    string.Create(CultureInfo.InvariantCulture, $"worker killed: decode ran past the {options.JobTimeoutSeconds:0.#} s limit"), null, peak);
            }
        }
    }

    private async Task<JobResult> FinishAsync(WorkerRequest request, Task<WorkerReply?> replyTask, long peak)
    {
        WorkerReply? reply;
        try
        {
            reply = await replyTask;
        }
        catch (Exception ex) when (ex is IOException or InvalidDataException or System.Text.Json.JsonException)
        {
            return await CrashedAsync("broken reply: " + ex.Message, peak);
        }
        if (reply is null)
        {
            return await CrashedAsync("worker exited without replying", peak);
        }
        if (reply.Id != request.Id)
        {
            return await CrashedAsync($"reply for job {reply.Id} while waiting for {request.Id}", peak);
        }
        peak = Math.Max(peak, reply.PeakWorkingSetBytes);
        if (reply.Recycle)
        {
            _broken = true;
        }
        return reply.Ok
            ? new JobResult(JobEnd.Done, null, reply, peak)
            : new JobResult(JobEnd.Rejected, reply.Reason, reply, peak);
    }

    private async Task<JobResult> CrashedAsync(string what, long peak)
    {
        await KillAsync();
        string exit = _process.HasExited ? DescribeExit(_process.ExitCode) : "still running";
        string? telling;
        lock (_stderrTail)
        {
            telling = _crashLine ?? _stderrTail.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries).LastOrDefault();
        }
        string detail = telling is null ? "" : "; stderr: " + telling;
        return new JobResult(JobEnd.Crashed, $"worker crashed ({exit}): {what}{detail}", null, peak);
    }

    /// <summary>The runtime's crash lines: "Unhandled exception. ...", "Process terminated. ...", "Out of memory.".</summary>
    private static bool IsTelling(string line) =>
        line.StartsWith("Unhandled exception", StringComparison.Ordinal) || line.StartsWith("Process terminated", StringComparison.Ordinal)
        || line.StartsWith("Out of memory", StringComparison.Ordinal);

    private static string DescribeExit(int code) =>
        OperatingSystem.IsWindows() || code <= 128
            ? "exit code " + code.ToString(CultureInfo.InvariantCulture)
            : "signal " + (code - 128).ToString(CultureInfo.InvariantCulture);

    private long WorkingSet()
    {
        try
        {
            _process.Refresh();
            return _process.HasExited ? 0 : _process.WorkingSet64;
        }
        catch (InvalidOperationException)
        {
            return 0;
        }
    }

    private string StderrTail()
    {
        lock (_stderrTail)
        {
            return _stderrTail.ToString();
        }
    }

    private async Task KillAsync()
    {
        _broken = true;
        try
        {
            if (!_process.HasExited)
            {
                _process.Kill(entireProcessTree: true);
            }
            using var wait = new CancellationTokenSource(TimeSpan.FromSeconds(10));
            await _process.WaitForExitAsync(wait.Token);
        }
        catch (InvalidOperationException)
        {
        }
        catch (OperationCanceledException)
        {
        }
    }

    /// <summary>Closes stdin (the worker then exits), and kills it if it does not within 2 s.</summary>
    public async ValueTask DisposeAsync()
    {
        try
        {
            _input.Dispose();
        }
        catch (IOException)
        {
        }
        if (!_process.HasExited)
        {
            using var wait = new CancellationTokenSource(TimeSpan.FromSeconds(2));
            try
            {
                await _process.WaitForExitAsync(wait.Token);
            }
            catch (OperationCanceledException)
            {
                await KillAsync();
            }
        }
        _process.Dispose();
        (_job as IDisposable)?.Dispose();
    }
}

/// <summary>A worker could not be started (missing executable, no hello): not the file's fault.</summary>
internal sealed class WorkerStartException : Exception
{
    public WorkerStartException()
    {
    }

    public WorkerStartException(string message) : base(message)
    {
    }

    public WorkerStartException(string message, Exception inner) : base(message, inner)
    {
    }
}
