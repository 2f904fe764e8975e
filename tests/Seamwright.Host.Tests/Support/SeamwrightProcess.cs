using System.Diagnostics;
using System.Text;

namespace Seamwright.Tests.Support;

/// <summary>Runs the real <c>seamwright</c> executable (built beside the tests) as a child process.</summary>
internal sealed class SeamwrightProcess : IDisposable
{
    private readonly Process _process;
    private readonly StringBuilder _out = new();
    private readonly StringBuilder _err = new();

    private SeamwrightProcess(Process process) => _process = process;

    public static string Dll => Path.Combine(AppContext.BaseDirectory, "seamwright.dll");

    /// <summary>Settings overrides that make the tests fast: the checksum engine and short waits.</summary>
    public static readonly string[] FastSettings =
    [
        "--Seamwright:Engine=checksum",
        "--Seamwright:Service:StableSeconds=1",
        "--Seamwright:Service:PollMilliseconds=200",
        "--Seamwright:Service:RescanSeconds=5",
        "--Seamwright:Profiles:default:Completion:QuietSeconds=2",
    ];

    public static SeamwrightProcess Start(string workingDirectory, params string[] args) =>
        StartWithEnvironment(workingDirectory, null, args);

    /// <summary>Starts with extra environment variables (e.g. the worker's test-only fault hooks).</summary>
    public static SeamwrightProcess StartWithEnvironment(string workingDirectory, IReadOnlyDictionary<string, string>? environment, params string[] args)
    {
        var psi = new ProcessStartInfo(Environment.GetEnvironmentVariable("DOTNET_HOST_PATH") ?? "dotnet")
        {
            WorkingDirectory = workingDirectory,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        psi.ArgumentList.Add(Dll);
        foreach (var a in args)
        {
            psi.ArgumentList.Add(a);
        }
        psi.Environment["DOTNET_CLI_TELEMETRY_OPTOUT"] = "1";
        psi.Environment["SEAMWRIGHT_TEST_HOOKS"] = "1"; // allows the fast checksum test engine
        foreach (var (key, value) in environment ?? new Dictionary<string, string>())
        {
            psi.Environment[key] = value;
        }
        var p = new Process { StartInfo = psi };
        var sp = new SeamwrightProcess(p);
        p.OutputDataReceived += (_, e) => { if (e.Data is not null) { lock (sp._out) { sp._out.AppendLine(e.Data); } } };
        p.ErrorDataReceived += (_, e) => { if (e.Data is not null) { lock (sp._err) { sp._err.AppendLine(e.Data); } } };
        p.Start();
        p.BeginOutputReadLine();
        p.BeginErrorReadLine();
        return sp;
    }

    /// <summary>Runs to the end (or fails the test after <paramref name="timeout"/>).</summary>
    public static (int Code, string Out, string Err) Run(string workingDirectory, TimeSpan timeout, params string[] args)
    {
        using var p = Start(workingDirectory, args);
        if (!p.WaitForExit(timeout))
        {
            p.Kill();
            throw new TimeoutException($"seamwright {string.Join(' ', args)} did not finish within {timeout}:\n{p.Output}\n{p.Errors}");
        }
        return (p.ExitCode, p.Output, p.Errors);
    }

    public bool HasExited => _process.HasExited;

    public int Id => _process.Id;

    public int ProcessId => _process.Id;

    public int ExitCode => _process.ExitCode;

    public string Output { get { lock (_out) { return _out.ToString(); } } }

    public string Errors { get { lock (_err) { return _err.ToString(); } } }

    public bool WaitForExit(TimeSpan timeout)
    {
        if (!_process.WaitForExit(timeout))
        {
            return false;
        }
        _process.WaitForExit(); // drain the output readers
        return true;
    }

    /// <summary>SIGKILL on Unix (no chance to clean up), TerminateProcess on Windows.</summary>
    public void Kill()
    {
        try
        {
            _process.Kill(entireProcessTree: true);
            _process.WaitForExit();
        }
        catch (InvalidOperationException)
        {
        }
    }

    /// <summary>A polite stop (SIGTERM on Unix) so the host shuts down cleanly.</summary>
    public void Terminate()
    {
        if (OperatingSystem.IsWindows() || _process.HasExited)
        {
            Kill();
            return;
        }
        using var kill = Process.Start("kill", ["-TERM", _process.Id.ToString(System.Globalization.CultureInfo.InvariantCulture)]);
        kill.WaitForExit();
    }

    public void Dispose()
    {
        if (!_process.HasExited)
        {
            Kill();
        }
        _process.Dispose();
    }
}
