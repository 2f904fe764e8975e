using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Preview;
using Seamwright.Pipeline.Settings;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Metadata.Profiles.Exif;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Pipeline.Tests.Preview;

/// <summary>The preview's colour images come through the loader: its limits apply, and the pixels are ImageSharp's own upright, downscaled decode.</summary>
public sealed class PreviewLoaderTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    /// <summary>A colour JPEG of 300 x 200 stored pixels whose EXIF orientation is <paramref name="orientation"/>.</summary>
    private string Photo(string name, ushort orientation)
    {
        using var image = new Image<Rgb24>(300, 200);
        image.ProcessPixelRows(rows =>
        {
            for (int y = 0; y < rows.Height; y++)
            {
                var row = rows.GetRowSpan(y);
                for (int x = 0; x < row.Length; x++)
                {
                    row[x] = new Rgb24((byte)(x * 255 / 299), (byte)(y * 255 / 199), (byte)((x / 20 + y / 20) % 2 * 200));
                }
            }
        });
        image.Metadata.ExifProfile = new ExifProfile();
        image.Metadata.ExifProfile.SetValue(ExifTag.Orientation, orientation);
        string path = _folder.File(name);
        image.SaveAsJpeg(path);
        return path;
    }

    private static PreviewLoader Loader(IReadOnlyList<string> paths, LimitSettings? limits = null) =>
        new(paths, limits ?? new LimitSettings(), new MemoryBudget(256L << 20));

    [Theory]
    [InlineData(1)]
    [InlineData(3)]
    [InlineData(6)]
    [InlineData(8)]
    public void Open_OrientedPhoto_SamePixelsAsImageSharpsOwnAutoOrientAndResize(ushort orientation)
    {
        // Reference: ImageSharp 2.1's own decode with metadata, AutoOrient and Resize (what the
        // preview did before it went through the loader), so the preview bytes stay the same.
        string path = Photo("oriented.jpg", orientation);
        using var reference = Image.Load<Rgb24>(path);
        reference.Mutate(x => x.AutoOrient());
        reference.Mutate(x => x.Resize((int)Math.Round(reference.Width * 0.5), (int)Math.Round(reference.Height * 0.5)));

        using var opened = Loader([path]).Open(0, 150);

        Assert.NotNull(opened);
        Assert.Equal((reference.Width, reference.Height), (opened.Width, opened.Height));
        Assert.Equal(orientation is 6 or 8 ? (100, 150) : (150, 100), (opened.Width, opened.Height));
        for (int y = 0; y < opened.Height; y++)
        {
            for (int x = 0; x < opened.Width; x++)
            {
                Assert.Equal(reference[x, y], opened[x, y]);
            }
        }
    }

    [Fact]
    public void Open_NeverScalesUp()
    {
        using var opened = Loader([Photo("small.jpg", 1)]).Open(0, 4000);
        Assert.Equal((300, 200), (opened!.Width, opened.Height));
    }

    [Fact]
    public void Open_ImageAboveTheRunsPixelLimit_GivesNullWithoutDecoding()
    {
        string path = Photo("big.jpg", 1);
        // 300 x 200 = 0.06 MP, above a 0.05 MP limit: the loader refuses it from the header.
        Assert.Null(Loader([path], new LimitSettings { MaxMegapixels = 0.05 }).Open(0, 100));
        Assert.NotNull(Loader([path], new LimitSettings { MaxMegapixels = 0.07 }).Open(0, 100));
    }

    [Fact]
    public void Open_NotAnImage_GivesNull()
    {
        string path = _folder.File("notes.jpg");
        File.WriteAllText(path, "not an image at all");
        Assert.Null(Loader([path]).Open(0, 100));
    }
}
