using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Alignment;
using Seamwright.Tests.Support;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Metadata.Profiles.Exif;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Tests.Alignment;

/// <summary>
/// EXIF focal length in pixels and the set's cameras (<see cref="ExifCamera"/>, <see cref="SetCameras"/>).
/// Worked example values are our own: a 6.17 mm wide sensor of 4000 pixels (6483 pixels per cm) and a
/// 4.25 mm lens give 4.25 x 648.3 = 2755.3 px; a 26 mm equivalent on a 4000 x 3000 image (diagonal
/// 5000 px) gives 26 / 43.267 x 5000 = 3004.6 px.
/// </summary>
public sealed class ExifCameraTests
{
    private static readonly ImageSize Full = new(4000, 3000);

    [Fact]
    public void FocalFrom_FocalPlaneResolution_GivesPixels()
    {
        Assert.Equal(4.25 * 6483 / 10, ExifCamera.FocalFrom(4.25, 6483, 3, null, null, null, Full)!.Value, 9);
        Assert.Equal(4.25 * 16468 / 25.4, ExifCamera.FocalFrom(4.25, 16468, 2, null, null, 26, Full)!.Value, 9); // inches; the plane wins over the 35 mm figure
    }

    [Fact]
    public void FocalFrom_ImageResizedSinceCapture_ScalesWithTheImage()
    {
        // Captured at 4000 x 3000, now 1000 x 750 (either orientation): a quarter of the pixels per mm.
        Assert.Equal(4.25 * 6483 / 10 / 4, ExifCamera.FocalFrom(4.25, 6483, 3, 4000, 3000, null, new ImageSize(1000, 750))!.Value, 9);
        Assert.Equal(4.25 * 6483 / 10 / 4, ExifCamera.FocalFrom(4.25, 6483, 3, 4000, 3000, null, new ImageSize(750, 1000))!.Value, 9);
    }

    [Fact]
    public void FocalFrom_Only35mmEquivalent_UsesTheDiagonal()
    {
        Assert.Equal(26 / Math.Sqrt(36 * 36 + 24 * 24) * 5000, ExifCamera.FocalFrom(4.25, null, null, null, null, 26, Full)!.Value, 9);
    }

    [Fact]
    public void FocalFrom_NothingOrNonsense_Null()
    {
        Assert.Null(ExifCamera.FocalFrom(null, null, null, null, null, null, Full));
        Assert.Null(ExifCamera.FocalFrom(4.25, 6483, 1, null, null, null, Full)); // unit 1: no unit
        Assert.Null(ExifCamera.FocalFrom(0.001, 6483, 3, null, null, null, Full)); // 0.65 px: not a focal length
    }

    [Fact]
    public void Read_JpegWithExif_MakeModelAndFocal()
    {
        using var dir = new ScratchFolder();
        string path = dir.Sub("a.jpg");
        using (var image = new Image<L8>(400, 300))
        {
            var exif = new ExifProfile();
            exif.SetValue(ExifTag.Make, "Invented Optics");
            exif.SetValue(ExifTag.Model, "Model 7");
            exif.SetValue(ExifTag.FocalLength, new Rational(425, 100));
            exif.SetValue(ExifTag.FocalPlaneXResolution, new Rational(6483, 1));
            exif.SetValue(ExifTag.FocalPlaneResolutionUnit, (ushort)3);
            exif.SetValue(ExifTag.PixelXDimension, 4000);
            exif.SetValue(ExifTag.PixelYDimension, 3000);
            image.Metadata.ExifProfile = exif;
            image.SaveAsJpeg(path);
        }
        var camera = ExifCamera.Read(path, new ImageSize(400, 300));
        Assert.Equal("Invented Optics Model 7", camera.Camera);
        Assert.Equal(4.25 * 6483 / 10 / 10, camera.FocalPx!.Value, 6);
        Assert.Equal(ExifCamera.None, ExifCamera.Read(dir.Sub("missing.jpg"), new ImageSize(400, 300)));
    }

    [Fact]
    public void From_SameSizeAndMakeModel_OneCameraWithTheMedianFocal()
    {
        var size = new ImageSize(640, 480);
        var sizes = new[] { size, size, size, size, new ImageSize(480, 640) };
        var exif = new[] { new ExifCamera("A", 700), new ExifCamera("A", 720), new ExifCamera("A", null), new ExifCamera("B", 500), new ExifCamera("A", 710) };
        var cameras = SetCameras.From(sizes, exif);
        Assert.Equal(new[] { 0, 0, 0, 1, 2 }, cameras.CameraOf);
        Assert.Equal(new double?[] { 710, 500, 710 }, cameras.FocalPx);
        Assert.Equal(new[] { 0, 0, 0, 0, 1 }, SetCameras.Of(sizes).CameraOf);
        Assert.All(SetCameras.Of(sizes).FocalPx, f => Assert.Null(f));
    }
}
