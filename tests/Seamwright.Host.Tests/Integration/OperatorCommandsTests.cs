using Seamwright.Pipeline.State;
using Seamwright.Tests.Support;

namespace Seamwright.Host.Tests.Integration;

/// <summary>`rerun` path resolution and dry runs beside a running service, `run` exit codes over unchanged sets, settings errors at start.</summary>
public class OperatorCommandsTests
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(3);

    [Fact]
    public void Rerun_SetPathWhileWatchServesTheRootOnTheCommandLine_ResolvesTheRootDryRunWorksRealRunRedoesTheSet()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/shelf"), 3, seedBase: 70);
        using (var service = SeamwrightProcess.Start(dir.Path, ["watch", dir.Sub("in"), .. SeamwrightProcess.FastSettings]))
        {
            // No --output: the default output root is the sibling in-seam.
            Ledger.WaitUntil(dir.Sub("in-seam"), st => st.Sets().Any(s => s.State == SetStates.Done), Limit, "the set done", service);
            var (upToDate, upToDateOut, upToDateErr) = SeamwrightProcess.Run(dir.Path, Limit, ["rerun", dir.Sub("in/shelf"), "--dry-run", .. SeamwrightProcess.FastSettings]);
            Assert.True(upToDate == ExitCodes.Ok, upToDateOut + upToDateErr); // the lock of the running service does not refuse a dry run
            Assert.Contains("Nothing would be redone: all 1 sets are up to date", upToDateOut, StringComparison.Ordinal);

            var (forced, forcedOut, _) = SeamwrightProcess.Run(dir.Path, Limit, ["rerun", dir.Sub("in/shelf"), "--dry-run", "--force", .. SeamwrightProcess.FastSettings]);
            Assert.Equal(ExitCodes.FinishedWithProblems, forced); // 3: something would be redone
            Assert.Contains("  shelf\tforced", forcedOut, StringComparison.Ordinal);
            Assert.DoesNotContain("  .\t", forcedOut, StringComparison.Ordinal);
            service.Terminate();
            Assert.True(service.WaitForExit(TimeSpan.FromSeconds(60)));
        }
        long before = Ledger.Read(dir.Sub("in-seam"), st => st.GetSet("shelf")!.DoneRun!.Value);

        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, ["rerun", dir.Sub("in/shelf"), "--force", .. SeamwrightProcess.FastSettings]);

        Assert.True(code == ExitCodes.Ok, stdout + stderr);
        Assert.True(Ledger.Read(dir.Sub("in-seam"), st => st.GetSet("shelf")!.DoneRun!.Value) > before);
        Assert.Null(Ledger.Read(dir.Sub("in-seam"), st => st.GetSet(".")));
        Assert.False(File.Exists(dir.Sub("in-seam/seam-manifest.json"))); // nothing written at the top of the output root
        Assert.False(Directory.Exists(dir.Sub("in/shelf-seam")));
    }

    [Fact]
    public void Rerun_FolderOfImagesNobodyServes_RefusedInsteadOfBecomingSetDot()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("loose"), 2, seedBase: 80);
        var (code, _, stderr) = SeamwrightProcess.Run(dir.Path, Limit, ["rerun", dir.Sub("loose"), "--dry-run", .. SeamwrightProcess.FastSettings]);
        Assert.Equal(ExitCodes.BadArguments, code);
        Assert.Contains("cannot tell which watched root", stderr, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_UnchangedSetWithOldBadFile_ExitsZeroUnlessStrict()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/a"), 3, seedBase: 90);
        File.WriteAllText(dir.Sub("in/a/broken.png"), "not an image");
        string[] args = ["run", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings];
        Assert.Equal(ExitCodes.FinishedWithProblems, SeamwrightProcess.Run(dir.Path, Limit, args).Code); // processed now, with a bad file

        var (again, againOut, _) = SeamwrightProcess.Run(dir.Path, Limit, args);
        var (strict, _, _) = SeamwrightProcess.Run(dir.Path, Limit, [.. args, "--strict"]);

        Assert.Equal(ExitCodes.Ok, again); // nothing processed in this run
        Assert.Contains("unchanged", againOut, StringComparison.Ordinal);
        Assert.Equal(ExitCodes.FinishedWithProblems, strict);
    }

    [Fact]
    public void Watch_SettingsFileSyntaxErrorOrWrongType_OneLineExitTwoNamingFileLineOrRange()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("in"));
        string bad = dir.Sub("bad.json");
        File.WriteAllText(bad, "{\n  \"Seamwright\": {\n    \"Service\": { \"StableSeconds\": 5, }\n  ,\n}\n");
        var (syntax, syntaxOut, syntaxErr) = SeamwrightProcess.Run(dir.Path, Limit, ["watch", dir.Sub("in"), "--output", dir.Sub("out"), "--config", bad]);
        var (type, typeOut, typeErr) = SeamwrightProcess.Run(dir.Path, Limit,
            ["watch", dir.Sub("in"), "--output", dir.Sub("out"), .. SeamwrightProcess.FastSettings, "--Seamwright:Service:StableSeconds=abc"]);

        Assert.Equal(ExitCodes.BadArguments, syntax);
        Assert.Contains(bad, syntaxErr, StringComparison.Ordinal);
        Assert.Contains("LineNumber: ", syntaxErr, StringComparison.Ordinal);
        Assert.Equal(ExitCodes.BadArguments, type);
        Assert.Contains("Seamwright:Service:StableSeconds", typeErr, StringComparison.Ordinal);
        Assert.Contains("allowed: 0 to 3600 seconds", typeErr, StringComparison.Ordinal);
        foreach (string text in new[] { syntaxOut + syntaxErr, typeOut + typeErr })
        {
            Assert.DoesNotContain("   at ", text, StringComparison.Ordinal);
        }
    }
}
