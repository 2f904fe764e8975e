using Seamwright.Pipeline.Output;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Output;

public class AtomicFileSweepTests
{
    [Fact]
    public void SweepTemporaries_LeftoverFromCrash_RemovedAndWholeFilesKept()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("x"));
        File.WriteAllText(dir.Sub("x/.a.json.1234abcd" + AtomicFile.TemporarySuffix), "torn");
        File.WriteAllText(dir.Sub("x/a.json"), "whole");
        Assert.Equal(1, AtomicFile.SweepTemporaries(dir.Path));
        Assert.Equal(new[] { dir.Sub("x/a.json") }, Directory.GetFiles(dir.Sub("x")));
    }

    [Fact]
    public void WriteAllBytesNotDurable_ExistingTarget_ReplacedWithoutLeftovers()
    {
        using var dir = new ScratchFolder();
        string path = dir.Sub("c/entry.bin");
        Directory.CreateDirectory(dir.Sub("c"));
        AtomicFile.WriteAllBytesNotDurable(path, [1, 2, 3]);
        AtomicFile.WriteAllBytesNotDurable(path, [4]);
        Assert.Equal(new byte[] { 4 }, File.ReadAllBytes(path));
        Assert.Single(Directory.GetFiles(dir.Sub("c")));
    }
}
