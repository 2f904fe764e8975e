using Seamwright.Pipeline.Output;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Output;

public class AtomicFileTests
{
    [Fact]
    public void WriteAllBytes_OverExistingFile_ReplacesContentAndLeavesNoTemporary()
    {
        using var dir = new ScratchFolder();
        string path = dir.Sub("a/b/out.json");
        AtomicFile.WriteAllBytes(path, "old"u8);
        AtomicFile.WriteAllBytes(path, "new content"u8);
        Assert.Equal("new content", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(Path.GetDirectoryName(path)!));
    }

    [Fact]
    public void Write_WriterThrows_TargetUnchangedAndTemporaryRemoved()
    {
        using var dir = new ScratchFolder();
        string path = dir.Sub("out.json");
        AtomicFile.WriteAllBytes(path, "kept"u8);
        Assert.Throws<InvalidOperationException>(() => AtomicFile.Write(path, s =>
        {
            s.Write("partial"u8);
            throw new InvalidOperationException("writer failed");
        }));
        Assert.Equal("kept", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(dir.Path));
    }

    [Fact]
    public void SweepTemporaries_LeftoverFromCrash_Removed()
    {
        using var dir = new ScratchFolder();
        Directory.CreateDirectory(dir.Sub("x"));
        File.WriteAllText(dir.Sub("x/.a.json.1234abcd" + AtomicFile.TempSuffix), "torn");
        File.WriteAllText(dir.Sub("x/a.json"), "whole");
        Assert.Equal(1, AtomicFile.SweepTemporaries(dir.Path));
        Assert.Equal(new[] { dir.Sub("x/a.json") }, Directory.GetFiles(dir.Sub("x")));
    }
}
