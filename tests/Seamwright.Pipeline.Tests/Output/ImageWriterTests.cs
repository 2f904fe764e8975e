using Seamwright.Pipeline.Loading;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Tests.Loading;

namespace Seamwright.Pipeline.Tests.Output;

public sealed class ImageWriterTests : IDisposable
{
    private readonly TempFolder _folder = new();

    [Fact]
    public void WritePng_ThenLoad_RoundTripsExactly()
    {
        var gray = TestFiles.Pattern(70, 50, 21);
        string path = _folder.File("preview.png");
        ImageWriter.Write(path, gray);
        Assert.Equal(gray.Pixels, new ImageLoader().Load(path).Image.Pixels);
    }

    [Fact]
    public void WriteJpeg_Twice_GivesIdenticalBytes()
    {
        var gray = TestFiles.Pattern(70, 50, 22);
        string a = _folder.File("a.jpg");
        string b = _folder.File("b.jpg");
        ImageWriter.Write(a, gray, 85);
        ImageWriter.Write(b, gray, 85);
        Assert.Equal(File.ReadAllBytes(a), File.ReadAllBytes(b));
        Assert.Equal(ImageFileFormat.Jpeg, new ImageLoader().Load(a).Format);
    }

    [Fact]
    public void Write_UnknownExtension_Throws() =>
        Assert.Throws<ArgumentException>(() => ImageWriter.Write(_folder.File("x.gif"), TestFiles.Pattern(4, 4, 1)));

    public void Dispose() => _folder.Dispose();
}
