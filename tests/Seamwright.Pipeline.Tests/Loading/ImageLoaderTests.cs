using Seamwright.Core.Imaging;
using Seamwright.Pipeline.Loading;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Formats.Png;
using SixLabors.ImageSharp.Formats.Tiff;
using SixLabors.ImageSharp.Formats.Webp;
using SixLabors.ImageSharp.Metadata.Profiles.Exif;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Pipeline.Tests.Loading;

public sealed class ImageLoaderTests : IDisposable
{
    private readonly TempFolder _folder = new();

    [Theory]
    [InlineData("tile.png", ImageFileFormat.Png)]
    [InlineData("tile.tif", ImageFileFormat.Tiff)]
    [InlineData("tile.bmp", ImageFileFormat.Bmp)]
    [InlineData("tile.webp", ImageFileFormat.Webp)]
    public void Load_LosslessFormats_ReturnsExactPixels(string name, ImageFileFormat format)
    {
        var gray = TestFiles.Pattern(97, 61, 7);
        string path = _folder.File(name);
        using (var image = TestFiles.ToImage(gray))
        {
            switch (format)
            {
                case ImageFileFormat.Webp:
                    image.Save(path, new WebpEncoder { FileFormat = WebpFileFormatType.Lossless });
                    break;
                case ImageFileFormat.Tiff:
                    image.Save(path, new TiffEncoder { BitsPerPixel = TiffBitsPerPixel.Bit8 });
                    break;
                default:
                    image.Save(path);
                    break;
            }
        }
        var loaded = new ImageLoader().Load(path);
        Assert.Equal(format, loaded.Format);
        Assert.Equal(new Core.Geometry.ImageSize(97, 61), loaded.DisplaySize);
        Assert.Null(loaded.Stretch);
        Assert.Equal(gray.Pixels, loaded.Image.Pixels);
    }

    [Fact]
    public void Load_Jpeg_ReturnsCloseGrayPixels()
    {
        var gray = TestFiles.Pattern(160, 120, 8);
        string path = _folder.File("scan.jpg");
        File.WriteAllBytes(path, TestFiles.Jpeg(gray));
        var loaded = new ImageLoader().Load(path);
        Assert.Equal(ImageFileFormat.Jpeg, loaded.Format);
        double mean = 0;
        for (int i = 0; i < gray.Pixels.Length; i++)
        {
            mean += Math.Abs(gray.Pixels[i] - loaded.Image.Pixels[i]);
        }
        Assert.True(mean / gray.Pixels.Length < 4, $"mean difference {mean / gray.Pixels.Length}");
    }

    [Fact]
    public void Load_PngWithJpgExtension_LoadsByContent()
    {
        var gray = TestFiles.Pattern(20, 10, 9);
        string path = _folder.File("misnamed.jpg");
        using (var image = TestFiles.ToImage(gray))
        {
            image.Save(path, new PngEncoder());
        }
        Assert.Equal(ImageFileFormat.Png, new ImageLoader().Load(path).Format);
    }

    [Theory]
    [InlineData(255, 0, 0, 54)]
    [InlineData(0, 255, 0, 182)]
    [InlineData(0, 0, 255, 18)]
    [InlineData(200, 200, 200, 200)]
    public void Load_ColourPng_UsesBt709Weights(byte r, byte g, byte b, int expected)
    {
        // ITU-R BT.709 luma weights 0.2126, 0.7152, 0.0722 (Recommendation ITU-R BT.709-6, item 3.2).
        string path = _folder.File("colour.png");
        using (var image = new Image<Rgb24>(8, 8, new Rgb24(r, g, b)))
        {
            image.Save(path, new PngEncoder { ColorType = PngColorType.Rgb });
        }
        var loaded = new ImageLoader().Load(path);
        Assert.All(loaded.Image.Pixels, v => Assert.InRange(v, expected - 1, expected + 1));
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(4)]
    [InlineData(5)]
    [InlineData(6)]
    [InlineData(7)]
    [InlineData(8)]
    public void Load_ExifOrientation_ReturnsImageAsDisplayed(int orientation)
    {
        var display = TestFiles.Pattern(40, 25, 10);
        var stored = ExifOrientation.ToStored(display, orientation);
        string path = _folder.File($"oriented-{orientation}.png");
        using (var image = TestFiles.ToImage(stored))
        {
            image.Metadata.ExifProfile = new ExifProfile();
            image.Metadata.ExifProfile.SetValue(ExifTag.Orientation, (ushort)orientation);
            image.Save(path, new PngEncoder());
        }
        var loaded = new ImageLoader().Load(path);
        Assert.Equal(orientation, loaded.Header.Orientation);
        Assert.Equal(new Core.Geometry.ImageSize(stored.Width, stored.Height), loaded.Header.StoredSize);
        Assert.Equal(new Core.Geometry.ImageSize(40, 25), loaded.DisplaySize);
        Assert.Equal(new Core.Geometry.ImageSize(40, 25), loaded.Header.DisplaySize);
        Assert.Equal(display.Pixels, loaded.Image.Pixels);
    }

    [Theory]
    [InlineData(2)]
    [InlineData(5)]
    [InlineData(6)]
    [InlineData(7)]
    [InlineData(8)]
    public void Load_ExifOrientation_AgreesWithImageSharpAutoOrient(int orientation)
    {
        // Reference: ImageSharp's own AutoOrient processor on the same file.
        var stored = TestFiles.Pattern(30, 20, 14);
        string path = _folder.File($"auto-{orientation}.png");
        using (var image = TestFiles.ToImage(stored))
        {
            image.Metadata.ExifProfile = new ExifProfile();
            image.Metadata.ExifProfile.SetValue(ExifTag.Orientation, (ushort)orientation);
            image.Save(path, new PngEncoder());
        }
        using var reference = Image.Load<L8>(path);
        reference.Mutate(x => x.AutoOrient());
        var loaded = new ImageLoader().Load(path);
        Assert.Equal(reference.Width, loaded.Image.Width);
        for (int y = 0; y < reference.Height; y++)
        {
            for (int x = 0; x < reference.Width; x++)
            {
                Assert.Equal(reference[x, y].PackedValue, loaded.Image[x, y]);
            }
        }
    }

    [Fact]
    public void Load_DecodeTimeLimitExceeded_ThrowsTimeout()
    {
        string path = _folder.File("slow.png");
        using (var image = TestFiles.ToImage(TestFiles.Pattern(1500, 1000, 15)))
        {
            image.Save(path, new PngEncoder());
        }
        var limits = new LoadLimits { DecodeTimeout = TimeSpan.FromTicks(1) };
        var error = Assert.Throws<ImageLoadException>(() => new ImageLoader(limits).Load(path));
        Assert.Equal(ImageLoadFailure.Timeout, error.Failure);
    }

    [Fact]
    public void Load_JpegRotatedByCamera_ReturnsUprightImage()
    {
        // Orientation 6 is what a camera held upright writes: stored landscape, shown portrait.
        var display = TestFiles.Pattern(60, 90, 11);
        var stored = ExifOrientation.ToStored(display, 6);
        Assert.Equal(90, stored.Width);
        string path = _folder.File("camera.jpg");
        using (var image = TestFiles.ToImage(stored))
        {
            image.Metadata.ExifProfile = new ExifProfile();
            image.Metadata.ExifProfile.SetValue(ExifTag.Orientation, (ushort)6);
            image.SaveAsJpeg(path);
        }
        var loaded = new ImageLoader().Load(path);
        Assert.Equal(new Core.Geometry.ImageSize(60, 90), loaded.DisplaySize);
        double diff = 0;
        for (int i = 0; i < display.Pixels.Length; i++)
        {
            diff += Math.Abs(display.Pixels[i] - loaded.Image.Pixels[i]);
        }
        Assert.True(diff / display.Pixels.Length < 4, $"mean difference {diff / display.Pixels.Length}");
    }

    [Fact]
    public void Load_SixteenBitPngUsingNarrowRange_StretchesByPercentiles()
    {
        // A 12-bit-like scan: values 1000..3000 in a 16-bit container, plus two outliers.
        const int w = 200, h = 100;
        string path = _folder.File("deep.png");
        using (var image = new Image<L16>(w, h))
        {
            for (int y = 0; y < h; y++)
            {
                for (int x = 0; x < w; x++)
                {
                    image[x, y] = new L16((ushort)(1000 + x * 2000 / (w - 1)));
                }
            }
            image[0, 0] = new L16(0);
            image[1, 0] = new L16(65535);
            image.Save(path, new PngEncoder { ColorType = PngColorType.Grayscale, BitDepth = PngBitDepth.Bit16 });
        }
        var loaded = new ImageLoader().Load(path);
        Assert.Equal(16, loaded.Header.BitsPerSample);
        Assert.NotNull(loaded.Stretch);
        var range = loaded.Stretch.Value;
        // 0.1 % of 20000 samples is 20: the outliers fall outside the range, the ramp ends inside it.
        Assert.InRange(range.Low, 1000, 1030);
        Assert.InRange(range.High, 2970, 3000);
        Assert.Equal(0, loaded.Image[0, 50]);
        Assert.Equal(255, loaded.Image[w - 1, 50]);
        Assert.InRange(loaded.Image[w / 2, 50], 122, 133);
        // A plain bit shift would have left the whole ramp below 12.
        Assert.True(loaded.Image.Pixels.Count(v => v > 200) > 1000);
    }

    [Fact]
    public void Load_GoodAndBadFiles_LeavesInputsUnchanged()
    {
        var files = new List<string>();
        string good = _folder.File("good.png");
        using (var image = TestFiles.ToImage(TestFiles.Pattern(50, 40, 12)))
        {
            image.Save(good, new PngEncoder());
        }
        files.Add(good);
        string bad = _folder.File("bad.jpg");
        File.WriteAllText(bad, "not an image");
        files.Add(bad);
        string cut = _folder.File("cut.jpg");
        byte[] jpeg = TestFiles.Jpeg(TestFiles.Pattern(100, 80, 13));
        File.WriteAllBytes(cut, jpeg[..(jpeg.Length - 100)]);
        files.Add(cut);
        var before = files.ToDictionary(f => f, f => (TestFiles.Hash(f), File.GetLastWriteTimeUtc(f), new FileInfo(f).Length));
        var loader = new ImageLoader();
        foreach (string f in files)
        {
            try
            {
                loader.Load(f);
            }
            catch (ImageLoadException)
            {
                // Expected for the bad ones.
            }
        }
        foreach (string f in files)
        {
            Assert.Equal(before[f], (TestFiles.Hash(f), File.GetLastWriteTimeUtc(f), new FileInfo(f).Length));
        }
    }

    [Fact]
    public void Validate_BadLimits_NamesTheSetting()
    {
        var error = Assert.Throws<ArgumentOutOfRangeException>(() => new ImageLoader(new LoadLimits { MaxPixels = 0 }));
        Assert.Equal("MaxPixels", error.ParamName);
    }

    public void Dispose() => _folder.Dispose();
}
