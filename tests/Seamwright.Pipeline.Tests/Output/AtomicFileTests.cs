using Seamwright.Pipeline.Output;

namespace Seamwright.Pipeline.Tests.Output;

public sealed class AtomicFileTests : IDisposable
{
    private readonly TempFolder _folder = new();

    [Fact]
    public void WriteAllBytes_NewAndExistingTarget_ReplacesContentWithoutLeftovers()
    {
        string path = _folder.File("sidecar.json");
        AtomicFile.WriteAllBytes(path, "first"u8);
        Assert.Equal("first", File.ReadAllText(path));
        AtomicFile.WriteAllText(path, "second");
        Assert.Equal("second", File.ReadAllText(path));
        Assert.Equal(["sidecar.json"], Directory.GetFiles(_folder.Path).Select(Path.GetFileName));
    }

    [Fact]
    public void Write_CallbackThrows_KeepsOldContentAndRemovesTemporary()
    {
        string path = _folder.File("manifest.json");
        AtomicFile.WriteAllText(path, "old");
        Assert.Throws<InvalidOperationException>(() => AtomicFile.Write(path, stream =>
        {
            stream.Write("half-written"u8);
            throw new InvalidOperationException("simulated failure");
        }));
        Assert.Equal("old", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(_folder.Path));
    }

    [Fact]
    public void IsTemporary_TemporaryAndNormalNames_AreTold()
    {
        Assert.True(AtomicFile.IsTemporary("/x/.a.json.123.abc" + AtomicFile.TemporarySuffix));
        Assert.False(AtomicFile.IsTemporary("/x/a.json"));
        Assert.False(AtomicFile.IsTemporary("/x/a" + AtomicFile.TemporarySuffix));
    }

    public void Dispose() => _folder.Dispose();
}
