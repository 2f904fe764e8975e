using System.Diagnostics;
using System.Globalization;
using System.Text;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Serilog;

namespace Seamwright.Host.Operations;

/// <summary>
/// The downstream hand-off (a root's <c>OnSetDone</c>): once a set's manifest is written, the
/// configured program is started with the manifest's full path as its last argument, through
/// <see cref="ProcessStartInfo.ArgumentList"/> (no shell: nothing in a path or argument is
/// interpreted). It runs in the background, so no set waits for it, with the output root as its
/// working directory and its standard input closed; after <c>OnSetDoneTimeoutSeconds</c> it is
/// killed with its child processes. A program that cannot be started, exits non-zero or is killed
/// is logged with the set, the exit code and the tail of its standard error, and changes nothing
/// else (never an exit code, never a set's state). Sets whose run did not publish (failed,
/// abandoned, deferred, unchanged) hand nothing off.
/// </summary>
internal sealed class SetDoneHandoff(ILogger log, Action<string>? echo = null) : IDisposable
{
    /// <summary>Characters of the program's standard error kept for the log.</summary>
    internal const int ErrorTailChars = 2000;

    private readonly List<Task> _running = [];
    private readonly CancellationTokenSource _shutdown = new();

    /// <summary>Starts the hand-off of a finished set when its root configures one and the run published.</summary>
    public void After(SetOutcome outcome, RootSettings root, string outputRoot)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        ArgumentNullException.ThrowIfNull(root);
        if (outcome.Kind != SetOutcomeKind.Done || string.IsNullOrEmpty(root.OnSetDone))
        {
            return;
        }
        string manifest = Path.Combine(OutputLayout.SetFolder(outputRoot, outcome.SetId), OutputLayout.ManifestName);
        var call = new HandoffCall(outcome.SetId, root.OnSetDone, [.. root.OnSetDoneArguments, manifest], outputRoot,
            TimeSpan.FromSeconds(root.OnSetDoneTimeoutSeconds));
        var task = Task.Run(() => RunGuardedAsync(call));
        lock (_running)
        {
            _running.RemoveAll(t => t.IsCompleted);
            _running.Add(task);
        }
    }

    /// <summary>
    /// Waits for the hand-offs still running, at most <paramref name="grace"/>; those still
    /// running then are killed (and logged as killed at shutdown).
    /// </summary>
    public void WaitAll(TimeSpan grace)
    {
        Task[] running;
        lock (_running)
        {
            running = [.. _running];
        }
        if (running.Length == 0 || Task.WaitAll(running, grace))
        {
            return;
        }
        _shutdown.Cancel();
        Task.WaitAll(running, TimeSpan.FromSeconds(10));
    }

    public void Dispose() => _shutdown.Dispose();

    private async Task RunGuardedAsync(HandoffCall call)
    {
        try
        {
            await RunAsync(call).ConfigureAwait(false);
        }
#pragma warning disable CA1031 // a hand-off never stops the service: anything unexpected is logged
        catch (Exception e)
#pragma warning restore CA1031
        {
            Warn(call, "failed: " + e.GetType().Name + ": " + e.Message);
        }
    }

    private async Task RunAsync(HandoffCall call)
    {
        var psi = new ProcessStartInfo(HandoffProgram.Find(call.Program) ?? call.Program)
        {
            UseShellExecute = false,
            RedirectStandardInput = true,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            WorkingDirectory = call.WorkingDirectory,
        };
        foreach (var a in call.Arguments)
        {
            psi.ArgumentList.Add(a);
        }
        using var process = new Process { StartInfo = psi };
        var errors = new ErrorTail();
        process.ErrorDataReceived += (_, e) => errors.Add(e.Data);
        process.OutputDataReceived += (_, _) => { }; // drained so that a chatty program never blocks on a full pipe
        var clock = Stopwatch.StartNew();
        try
        {
            process.Start();
        }
        catch (Exception e) when (e is System.ComponentModel.Win32Exception or InvalidOperationException or IOException)
        {
            Warn(call, "could not be started: " + e.Message);
            return;
        }
        process.StandardInput.Close();
        process.BeginErrorReadLine();
        process.BeginOutputReadLine();
        using var limit = CancellationTokenSource.CreateLinkedTokenSource(_shutdown.Token);
        limit.CancelAfter(call.Timeout);
        try
        {
            await process.WaitForExitAsync(limit.Token).ConfigureAwait(false);
        }
        catch (OperationCanceledException)
        {
            Kill(process);
            string why = _shutdown.IsCancellationRequested
                ? "was still running at shutdown and was killed"
                : string.Create(CultureInfo.InvariantCulture, $"did not finish within {call.Timeout.TotalSeconds:0.###} s and was killed");
            Warn(call, why + errors.Describe());
            return;
        }
        double seconds = clock.Elapsed.TotalSeconds;
        if (process.ExitCode != 0)
        {
            Warn(call, string.Create(CultureInfo.InvariantCulture, $"exited with code {process.ExitCode} after {seconds:0.0} s") + errors.Describe());
            return;
        }
        log.Information("Set {Set}: hand-off {Program} finished (exit 0) in {Seconds:0.0} s", call.SetId, call.Program, seconds);
    }

    private void Warn(HandoffCall call, string what)
    {
        log.Warning("Set {Set}: hand-off {Program} {What}", call.SetId, call.Program, what);
        echo?.Invoke($"seamwright: set {call.SetId}: hand-off {call.Program} {what}");
    }

    private static void Kill(Process process)
    {
        try
        {
            process.Kill(entireProcessTree: true);
            process.WaitForExit(5000);
        }
        catch (Exception e) when (e is InvalidOperationException or System.ComponentModel.Win32Exception or NotSupportedException)
        {
            // already gone
        }
    }

    private sealed record HandoffCall(string SetId, string Program, IReadOnlyList<string> Arguments, string WorkingDirectory, TimeSpan Timeout);

    /// <summary>The last <see cref="ErrorTailChars"/> characters of the program's standard error.</summary>
    private sealed class ErrorTail
    {
        private readonly StringBuilder _text = new();

        public void Add(string? line)
        {
            if (line is null)
            {
                return;
            }
            lock (_text)
            {
                _text.Append(line).Append('\n');
                if (_text.Length > ErrorTailChars)
                {
                    _text.Remove(0, _text.Length - ErrorTailChars);
                }
            }
        }

        /// <summary>"; stderr: ..." with the tail on one line, or "" when it wrote nothing.</summary>
        public string Describe()
        {
            lock (_text)
            {
                string tail = _text.ToString().Trim().Replace("\n", " | ", StringComparison.Ordinal);
                return tail.Length == 0 ? "" : "; stderr: " + tail;
            }
        }
    }
}
