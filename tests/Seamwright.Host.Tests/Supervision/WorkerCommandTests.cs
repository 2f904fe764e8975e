using System.Diagnostics;

namespace Seamwright.Host.Tests.Supervision;

/// <summary>The real `seamwright worker` process on broken input: it must exit non-zero, never hang.</summary>
public class WorkerCommandTests
{
    private static (int Code, string Stderr) Run(byte[] stdin, params string[] args)
    {
        var launch = WorkerTestSupport.Launch;
        var start = new ProcessStartInfo(launch.FileName)
        {
            RedirectStandardInput = true,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (string a in launch.Arguments.Concat(args))
        {
            start.ArgumentList.Add(a);
        }
        using var process = Process.Start(start)!;
        var stdout = process.StandardOutput.BaseStream.CopyToAsync(Stream.Null);
        var stderr = process.StandardError.ReadToEndAsync();
        process.StandardInput.BaseStream.Write(stdin);
        process.StandardInput.Close();
        process.WaitForExit();
        stdout.Wait();
        return (process.ExitCode, stderr.Result);
    }

    [Fact]
    public void Worker_CorruptFrame_ExitsFatalWithReason()
    {
        var (code, stderr) = Run([0xFF, 0xFF, 0xFF, 0x7F, 1, 2, 3]);
        Assert.Equal(ExitCodes.Fatal, code);
        Assert.Contains("protocol failure", stderr, StringComparison.Ordinal);
    }

    [Fact]
    public void Worker_UnknownArgument_ExitsBadArguments()
    {
        var (code, stderr) = Run([], "--bogus");
        Assert.Equal(ExitCodes.BadArguments, code);
        Assert.Contains("unexpected argument '--bogus'", stderr, StringComparison.Ordinal);
    }

    [Fact]
    public void Worker_StdinClosedAtOnce_ExitsZero()
    {
        var (code, _) = Run([]);
        Assert.Equal(ExitCodes.Ok, code);
    }
}
