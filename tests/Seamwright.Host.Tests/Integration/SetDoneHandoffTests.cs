using System.Globalization;
using Seamwright.Tests.Support;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// The downstream hand-off (<c>OnSetDone</c>) with real programs: shell scripts that record the
/// arguments they were given, fail, or hang, started by the real <c>run</c> and <c>watch</c>.
/// </summary>
public class SetDoneHandoffTests
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(3);

    /// <summary>Writes an executable shell script into the scratch folder.</summary>
    [System.Runtime.Versioning.UnsupportedOSPlatform("windows")]
    private static string Script(ScratchFolder dir, string name, string body)
    {
        string path = dir.Sub(name);
        File.WriteAllText(path, "#!/bin/sh\n" + body + "\n");
        File.SetUnixFileMode(path, UnixFileMode.UserRead | UnixFileMode.UserWrite | UnixFileMode.UserExecute);
        return path;
    }

    /// <summary>
    /// A script that writes, into rec/SET.txt (SET = the manifest's folder name), every argument on
    /// its own line, whether the manifest existed when it ran, and its process id into rec/SET.pid.
    /// </summary>
    [System.Runtime.Versioning.UnsupportedOSPlatform("windows")]
    private static string Recorder(ScratchFolder dir, string then = "")
    {
        Directory.CreateDirectory(dir.Sub("rec"));
        string rec = dir.Sub("rec");
        return Script(dir, "record.sh",
            "last=\"\"; for a in \"$@\"; do last=\"$a\"; done\n" +
            "set_name=$(basename \"$(dirname \"$last\")\")\n" +
            $"out='{rec}'/\"$set_name\"\n" +
            "echo $$ > \"$out.pid\"\n" +
            "{ for a in \"$@\"; do printf 'arg:%s\\n' \"$a\"; done; if [ -f \"$last\" ]; then echo 'manifest present'; fi; } > \"$out.part\"\n" +
            "mv \"$out.part\" \"$out.txt\"\n" + then);
    }

    private static string[] RunArgs(ScratchFolder dir, params string[] extra) =>
        ["run", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings, .. extra];

    [Fact]
    public void Run_OnSetDone_EachPublishedSetHandsItsManifestPathAsOneUninterpretedArgument()
    {
        if (OperatingSystem.IsWindows())
        {
            return; // the recording program is a POSIX shell script
        }
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/a"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/b"), 3, 20);
        const string Tricky = "two words; $HOME `id` *";

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, RunArgs(dir,
            "--Seamwright:Run:OnSetDone=" + Recorder(dir), "--Seamwright:Run:OnSetDoneArguments:0=" + Tricky));

        Assert.True(code == 0, $"exit {code}\n{stdout}\n{stderr}");
        Assert.DoesNotContain("hand-off", stderr, StringComparison.Ordinal);
        foreach (var set in new[] { "a", "b" })
        {
            string manifest = Path.Combine(dir.Sub("out"), set, "seam-manifest.json");
            var lines = File.ReadAllLines(dir.Sub($"rec/{set}.txt"));
            Assert.Equal(["arg:" + Tricky, "arg:" + manifest, "manifest present"], lines);
        }
    }

    [Fact]
    public void Run_OnSetDoneFailsOrHangs_LoggedWithExitCodeAndErrorTailKilledAfterTimeoutNeverFatal()
    {
        if (OperatingSystem.IsWindows())
        {
            return;
        }
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/refuses"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/hangs"), 3, 20);
        string script = Script(dir, "downstream.sh",
            "case \"$1\" in\n" +
            "  */refuses/*) echo \"downstream refused $1\" >&2; exit 7 ;;\n" +
            $"  *) echo $$ > '{dir.Sub("hang.pid")}'; exec sleep 300 ;;\n" +
            "esac");

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, RunArgs(dir,
            "--Seamwright:Run:OnSetDone=" + script, "--Seamwright:Run:OnSetDoneTimeoutSeconds=2"));

        Assert.True(code == 0, $"the hand-off must not change the exit code: exit {code}\n{stdout}\n{stderr}");
        Assert.Contains("set refuses: hand-off " + script + " exited with code 7", stderr, StringComparison.Ordinal);
        Assert.Contains("stderr: downstream refused " + Path.Combine(dir.Sub("out"), "refuses", "seam-manifest.json"), stderr, StringComparison.Ordinal);
        Assert.Contains("set hangs: hand-off " + script + " did not finish within 2 s and was killed", stderr, StringComparison.Ordinal);
        AssertGone(int.Parse(File.ReadAllText(dir.Sub("hang.pid")).Trim(), CultureInfo.InvariantCulture));
        OutputChecks.ManifestIsComplete(dir.Sub("out/refuses"));
        OutputChecks.ManifestIsComplete(dir.Sub("out/hangs"));
        string log = string.Concat(Directory.GetFiles(dir.Sub("out/.seamwright/logs")).Select(File.ReadAllText));
        Assert.Contains("exited with code 7", log, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_SetThatFailsToPublish_HandsNothingOff()
    {
        if (OperatingSystem.IsWindows())
        {
            return;
        }
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/good"), 3, 1);
        TestImages.WriteSet(dir.Sub("in/blocked"), 3, 20);
        Directory.CreateDirectory(dir.Sub("out"));
        File.WriteAllText(dir.Sub("out/blocked"), "a file where the set's output folder must go");

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, RunArgs(dir, "--Seamwright:Run:OnSetDone=" + Recorder(dir)));

        Assert.True(code == 3, $"exit {code}\n{stdout}\n{stderr}");
        Assert.True(File.Exists(dir.Sub("rec/good.txt")), stdout + stderr);
        Assert.Equal(["good.pid", "good.txt"], Directory.GetFiles(dir.Sub("rec")).Select(Path.GetFileName).Order(StringComparer.Ordinal));
    }

    [Theory]
    [InlineData("--Seamwright:Run:OnSetDone=/nonexistent/seamwright-handoff", "Seamwright:Run:OnSetDone is '/nonexistent/seamwright-handoff', which is not an existing file")]
    [InlineData("--Seamwright:Run:OnSetDone=copy-to-archive --fast", "Seamwright:Run:OnSetDone is 'copy-to-archive --fast', which is not an existing file")]
    [InlineData("--Seamwright:Run:OnSetDoneTimeoutSeconds=0", "Seamwright:Run:OnSetDoneTimeoutSeconds is 0; allowed: 1 to 86400 seconds")]
    public void Run_BadHandoffSetting_RefusedWithKeyAndAllowedValues(string setting, string message)
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/a"), 2, 1);

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, RunArgs(dir, setting));

        Assert.True(code == 2, $"exit {code}\n{stdout}\n{stderr}");
        Assert.Contains(message, stderr, StringComparison.Ordinal);
        Assert.False(Directory.Exists(dir.Sub("out/a")));
    }

    [Fact]
    public void Watch_SlowHandoff_NextSetProcessedAndHandedOffMeanwhileKilledAtShutdown()
    {
        if (OperatingSystem.IsWindows())
        {
            return;
        }
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        string recorder = Recorder(dir, "exec sleep 300");
        using var service = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings,
            "--Seamwright:Run:OnSetDone=" + recorder, "--Seamwright:Run:OnSetDoneTimeoutSeconds=600", "--Seamwright:Service:ShutdownSeconds=2"]);
        Ledger.WaitUntil(dir.Sub("out"), _ => true, TimeSpan.FromSeconds(60), "the service to start", service);

        TestImages.WriteSet(dir.Sub("in/first"), 3, 1);
        WaitForFile(dir.Sub("rec/first.txt"), service);
        int first = int.Parse(File.ReadAllText(dir.Sub("rec/first.pid")).Trim(), CultureInfo.InvariantCulture);
        TestImages.WriteSet(dir.Sub("in/second"), 3, 20);
        WaitForFile(dir.Sub("rec/second.txt"), service);

        Assert.True(Alive(first), "the first hand-off should still be running while the second set was processed and handed off");
        Assert.Equal("arg:" + Path.Combine(dir.Sub("out"), "second", "seam-manifest.json"), File.ReadAllLines(dir.Sub("rec/second.txt"))[0]);
        int second = int.Parse(File.ReadAllText(dir.Sub("rec/second.pid")).Trim(), CultureInfo.InvariantCulture);
        service.Terminate();
        Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)), "did not stop");
        Assert.True(service.ExitCode == 0, $"exit {service.ExitCode}\n{service.Output}\n{service.Errors}");
        AssertGone(first);
        AssertGone(second);
        Assert.Contains("was still running at shutdown and was killed", service.Output + service.Errors, StringComparison.Ordinal);
    }

    private static void WaitForFile(string path, SeamwrightProcess service)
    {
        var end = DateTime.UtcNow + Limit;
        while (!File.Exists(path))
        {
            Assert.False(service.HasExited, $"the service exited ({(service.HasExited ? service.ExitCode : 0)}):\n{service.Output}\n{service.Errors}");
            Assert.True(DateTime.UtcNow < end, $"{path} did not appear:\n{service.Output}\n{service.Errors}");
            Thread.Sleep(250);
        }
    }

    /// <summary>A process is alive while /proc lists it and it is not a zombie waiting to be reaped.</summary>
    private static bool Alive(int pid)
    {
        try
        {
            string stat = File.ReadAllText($"/proc/{pid}/stat");
            return stat[(stat.LastIndexOf(')') + 2)..][0] != 'Z';
        }
        catch (Exception e) when (e is FileNotFoundException or DirectoryNotFoundException or IOException)
        {
            return false;
        }
    }

    private static void AssertGone(int pid)
    {
        var end = DateTime.UtcNow + TimeSpan.FromSeconds(15);
        while (Alive(pid) && DateTime.UtcNow < end)
        {
            Thread.Sleep(200);
        }
        Assert.False(Alive(pid), $"process {pid} is still running");
    }
}
