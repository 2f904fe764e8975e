using System.Diagnostics;
using Seamwright.Pipeline.Loading;
using SixLabors.ImageSharp;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Loading;

/// <summary>
/// Bad and hostile files must give a typed error naming the file, quickly and with bounded
/// memory (the service's cap is 500 MB). Times are printed for the record, not asserted.
/// </summary>
public sealed class HostileFileTests(ITestOutputHelper output) : IDisposable
{
    private const long MemoryCapBytes = 500L * 1024 * 1024;
    private readonly TempFolder _folder = new();

    public static TheoryData<string, ImageLoadFailure> Cases => new()
    {
        { "zero-byte.jpg", ImageLoadFailure.Empty },
        { "truncated.jpg", ImageLoadFailure.Truncated },
        { "huge-header.png", ImageLoadFailure.TooManyPixels },
        { "text-named.jpg", ImageLoadFailure.UnknownFormat },
        { "tiny-huge-offset.bmp", ImageLoadFailure.Corrupt },
        { "offset-past-end.bmp", ImageLoadFailure.Corrupt },
        { "huge-entry-count.tif", ImageLoadFailure.Corrupt },
        { "directory-loop.tif", ImageLoadFailure.Corrupt },
        { "truncated.png", ImageLoadFailure.Truncated },
        { "missing.png", ImageLoadFailure.Unreadable },
    };

    [Theory]
    [MemberData(nameof(Cases))]
    public void Load_HostileFile_ThrowsTypedErrorNamingFileWithBoundedMemory(string name, ImageLoadFailure expected)
    {
        string path = _folder.File(name);
        bool exists = Write(name, path);
        string? hashBefore = exists ? TestFiles.Hash(path) : null;
        var loader = new ImageLoader();

        using var process = Process.GetCurrentProcess();
        process.Refresh();
        long peakBefore = process.PeakWorkingSet64;
        long workingBefore = process.WorkingSet64;
        long allocatedBefore = GC.GetTotalAllocatedBytes(precise: true);
        var watch = Stopwatch.StartNew();
        var error = Assert.Throws<ImageLoadException>(() => loader.Load(path));
        watch.Stop();
        long allocated = GC.GetTotalAllocatedBytes(precise: true) - allocatedBefore;
        process.Refresh();
        long peakGrowth = process.PeakWorkingSet64 - peakBefore;
        long workingGrowth = process.WorkingSet64 - workingBefore;

        output.WriteLine($"{name}: {error.Failure} in {watch.Elapsed.TotalMilliseconds:0.0} ms, managed allocations {allocated / 1024.0:0} KiB, " +
                         $"working set growth {workingGrowth / 1048576.0:0.0} MiB, peak growth {peakGrowth / 1048576.0:0.0} MiB: {error.Message}");
        Assert.Equal(expected, error.Failure);
        Assert.Equal(path, error.FilePath);
        Assert.Contains(name, error.Message, StringComparison.Ordinal);
        Assert.False(string.IsNullOrWhiteSpace(error.Reason));
        Assert.True(allocated < MemoryCapBytes, $"allocated {allocated} bytes");
        Assert.True(peakGrowth < MemoryCapBytes, $"peak working set grew by {peakGrowth} bytes");
        if (exists)
        {
            Assert.Equal(hashBefore, TestFiles.Hash(path));
        }
    }

    [Fact]
    public void Probe_HugeHeaderPng_RejectsBeforeAnyDecode()
    {
        string path = _folder.File("huge.png");
        File.WriteAllBytes(path, TestFiles.PngClaimingSize(60000, 60000));
        var error = Assert.Throws<ImageLoadException>(() => new ImageLoader().Probe(path));
        Assert.Equal(ImageLoadFailure.TooManyPixels, error.Failure);
        Assert.Contains("60000 x 60000", error.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_FileAboveSizeCap_ThrowsFileTooLarge()
    {
        string path = _folder.File("big.jpg");
        File.WriteAllBytes(path, TestFiles.Jpeg(TestFiles.Pattern(200, 150, 1)));
        var error = Assert.Throws<ImageLoadException>(() => new ImageLoader(new LoadLimits { MaxFileBytes = 1000 }).Load(path));
        Assert.Equal(ImageLoadFailure.FileTooLarge, error.Failure);
    }

    [Fact]
    public void Load_FormatNotEnabled_ThrowsFormatNotAllowed()
    {
        string path = _folder.File("photo.jpg");
        File.WriteAllBytes(path, TestFiles.Jpeg(TestFiles.Pattern(64, 48, 2)));
        var limits = new LoadLimits { Formats = [ImageFileFormat.Png] };
        var error = Assert.Throws<ImageLoadException>(() => new ImageLoader(limits).Load(path));
        Assert.Equal(ImageLoadFailure.FormatNotAllowed, error.Failure);
    }

    [Fact]
    public void Load_DecodeAboveAllocationLimit_ThrowsMemoryLimit()
    {
        // 6000 x 4000 8-bit gray needs a 24 MB pixel buffer; the allocator is capped at 16 MB.
        string path = _folder.File("wide.png");
        using (var image = new SixLabors.ImageSharp.Image<SixLabors.ImageSharp.PixelFormats.L8>(6000, 4000))
        {
            image.Save(path, TestFiles.GrayPng);
        }
        var loader = new ImageLoader(new LoadLimits { AllocationLimitMegabytes = 16 });
        Assert.Equal(new Core.Geometry.ImageSize(6000, 4000), loader.Probe(path).StoredSize);
        var error = Assert.Throws<ImageLoadException>(() => loader.Load(path));
        Assert.True(error.Failure == ImageLoadFailure.MemoryLimit, error.ToString());
    }

    private static bool Write(string name, string path)
    {
        switch (name)
        {
            case "zero-byte.jpg":
                File.WriteAllBytes(path, []);
                return true;
            case "truncated.jpg":
                byte[] jpeg = TestFiles.Jpeg(TestFiles.Pattern(800, 600, 3));
                File.WriteAllBytes(path, jpeg[..(jpeg.Length / 2)]);
                return true;
            case "huge-header.png":
                File.WriteAllBytes(path, TestFiles.PngClaimingSize(60000, 60000));
                return true;
            case "text-named.jpg":
                File.WriteAllText(path, "This is a note about the map tiles, not an image.\n");
                return true;
            case "tiny-huge-offset.bmp":
                File.WriteAllBytes(path, TestFiles.TinyBmpWithHugeOffset());
                return true;
            case "offset-past-end.bmp":
                using (var image = TestFiles.ToImage(TestFiles.Pattern(8, 8, 4)))
                {
                    using var ms = new MemoryStream();
                    image.SaveAsBmp(ms);
                    byte[] bmp = ms.ToArray();
                    System.Buffers.Binary.BinaryPrimitives.WriteUInt32LittleEndian(bmp.AsSpan(10), 0x7FFFFFFF);
                    File.WriteAllBytes(path, bmp);
                }
                return true;
            case "huge-entry-count.tif":
                File.WriteAllBytes(path, TestFiles.BigTiffWithHugeEntryCount());
                return true;
            case "directory-loop.tif":
                File.WriteAllBytes(path, TestFiles.TiffWithDirectoryLoop());
                return true;
            case "truncated.png":
                using (var image = TestFiles.ToImage(TestFiles.Pattern(300, 200, 5)))
                {
                    using var ms = new MemoryStream();
                    image.SaveAsPng(ms);
                    byte[] png = ms.ToArray();
                    File.WriteAllBytes(path, png[..(png.Length * 2 / 3)]);
                }
                return true;
            default:
                return false;
        }
    }

    public void Dispose() => _folder.Dispose();
}
