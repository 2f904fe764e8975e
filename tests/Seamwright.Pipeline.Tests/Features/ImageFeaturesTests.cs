using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Features;

namespace Seamwright.Pipeline.Tests.Features;

public class ImageFeaturesTests
{
    private static readonly Lazy<Core.Imaging.GrayImage> Scene = new(() =>
        SceneRenderer.Render(new ProceduralScene(3, SceneStyle.EstateMap), 640, 480, Transform2D.Identity));

    [Fact]
    public void WriteRead_RoundTrip_IdenticalFeatures()
    {
        var f = ImageFeatureExtractor.Extract(Scene.Value, null, FeatureSettings.Default);
        using var stream = new MemoryStream();
        FeatureCacheCodec.Write(stream, f);
        stream.Position = 0;
        var back = FeatureCacheCodec.Read(stream);
        Assert.Equal(f.FullSize, back.FullSize);
        Assert.Equal(f.WorkingSize, back.WorkingSize);
        Assert.Equal(f.WorkingScale, back.WorkingScale);
        Assert.Equal(f.Keypoints, back.Keypoints);
        Assert.Equal(f.Descriptors, back.Descriptors);
        Assert.Equal(f.Patches, back.Patches);
        Assert.Equal(f.PatternVersion, back.PatternVersion);
        Assert.Equal(f.SettingsFingerprint, back.SettingsFingerprint);
        Assert.NotNull(back.Compact);
        Assert.Equal(f.Compact!.Scale, back.Compact!.Scale);
        Assert.Equal(f.Compact.Image.Pixels, back.Compact.Image.Pixels);
        Assert.Null(back.CompactMask);
    }

    [Fact]
    public void WriteRead_MaskedFeatures_CompactCopyAndMaskSurvive()
    {
        var f = ImageFeatureExtractor.Extract(Scene.Value, FeatureMask.ParseRectangles("100 50 300 200\n"), FeatureSettings.Default);
        using var stream = new MemoryStream();
        FeatureCacheCodec.Write(stream, f);
        stream.Position = 0;
        var back = FeatureCacheCodec.Read(stream);
        Assert.NotNull(back.CompactMask);
        Assert.Equal(f.CompactMask!.Pixels, back.CompactMask!.Pixels);
        Assert.Equal(f.Compact!.Image.Pixels, back.Compact!.Image.Pixels);
    }

    [Fact]
    public void Extract_LargeImage_CompactCopyWithinItsBudgetAndScaleSpaceInCopyPixels()
    {
        var full = SceneRenderer.Render(new ProceduralScene(3, SceneStyle.EstateMap), 2400, 1800, Transform2D.Scaling(0.25, 0.25), 1);
        var f = ImageFeatureExtractor.Extract(full, null, FeatureSettings.Default);
        var c = f.Compact!;
        Assert.True((long)c.Image.Width * c.Image.Height <= ImageFeatures.CompactPixels, $"{c.Image.Width} x {c.Image.Height}");
        Assert.True(c.Scale > 1.5, $"scale {c.Scale}");
        var set = f.ScaleSpace(new Seamwright.Core.Features.ScaleSpace.ScaleSpaceOptions())!;
        Assert.True(set.Count > 100, $"{set.Count} scale-space features");
        Assert.All(set.Keypoints, k => Assert.True(k.X >= -0.5 && k.X < c.Image.Width && k.Y >= -0.5 && k.Y < c.Image.Height));
        Assert.Same(set, f.ScaleSpace(new Seamwright.Core.Features.ScaleSpace.ScaleSpaceOptions()));
    }

    [Fact]
    public void ScaleSpace_MaskedRectangle_NoKeypointInside()
    {
        var options = new Seamwright.Core.Features.ScaleSpace.ScaleSpaceOptions();
        var masked = ImageFeatureExtractor.Extract(Scene.Value, FeatureMask.ParseRectangles("100 50 300 200\n"), FeatureSettings.Default);
        var unmasked = ImageFeatureExtractor.Extract(Scene.Value, null, FeatureSettings.Default);
        double s = masked.Compact!.Scale;
        bool Inside(float x, float y) => Seamwright.Core.Imaging.ScaledImage.ToSource(x, s) is var fx && Seamwright.Core.Imaging.ScaledImage.ToSource(y, s) is var fy
            && fx >= 100.5 && fx < 399.5 && fy >= 50.5 && fy < 249.5;
        Assert.True(unmasked.ScaleSpace(options)!.Keypoints.Count(k => Inside(k.X, k.Y)) > 10);
        Assert.DoesNotContain(masked.ScaleSpace(options)!.Keypoints, k => Inside(k.X, k.Y));
    }

    [Fact]
    public void Read_DamagedOrTruncated_InvalidDataException()
    {
        var f = ImageFeatureExtractor.Extract(Scene.Value, null, FeatureSettings.Default);
        using var stream = new MemoryStream();
        FeatureCacheCodec.Write(stream, f);
        byte[] bytes = stream.ToArray();
        var flipped = (byte[])bytes.Clone();
        flipped[bytes.Length / 2] ^= 0x10;
        Assert.Throws<InvalidDataException>(() => FeatureCacheCodec.Read(new MemoryStream(flipped)));
        Assert.Throws<InvalidDataException>(() => FeatureCacheCodec.Read(new MemoryStream(bytes[..(bytes.Length / 3)])));
        Assert.Throws<InvalidDataException>(() => FeatureCacheCodec.Read(new MemoryStream("not a cache"u8.ToArray())));
    }

    [Fact]
    public void Fingerprint_SameSettingsSameString_AnyChangeDiffers()
    {
        var a = new FeatureSettings();
        Assert.Equal(a.Fingerprint, new FeatureSettings().Fingerprint);
        Assert.Contains("sw-bin256-v1", a.Fingerprint, StringComparison.Ordinal);
        Assert.NotEqual(a.Fingerprint, (a with { AnalysisPixelBudget = 3_000_000 }).Fingerprint);
        Assert.NotEqual(a.Fingerprint, (a with { Detector = a.Detector with { MaxFeatures = 3000 } }).Fingerprint);
        Assert.NotEqual(a.Fingerprint, (a with { TemplateRadius = 9 }).Fingerprint);
    }

    [Fact]
    public void Extract_MaskedRectangle_NoKeypointInside()
    {
        var mask = FeatureMask.ParseRectangles("# ruler\n100 50 300 200\n");
        var f = ImageFeatureExtractor.Extract(Scene.Value, mask, FeatureSettings.Default);
        var unmasked = ImageFeatureExtractor.Extract(Scene.Value, null, FeatureSettings.Default);
        Assert.True(unmasked.Keypoints.Count(k => Inside(k.X, k.Y)) > 20);
        Assert.DoesNotContain(f.Keypoints, k => Inside(k.X, k.Y));
        static bool Inside(float x, float y) => x >= 100.5 && x < 399.5 && y >= 50.5 && y < 249.5;
    }

    [Fact]
    public void Extract_LargeImage_KeypointsAndPatchesInFullResolution()
    {
        // 3200 x 2400 = 7.7 MP, detected on an analysis image of at most 2 MP.
        var full = SceneRenderer.Render(new ProceduralScene(3, SceneStyle.EstateMap), 3200, 2400, Transform2D.Scaling(0.2, 0.2), 1);
        var f = ImageFeatureExtractor.Extract(full, null, FeatureSettings.Default);
        Assert.Equal(new ImageSize(3200, 2400), f.FullSize);
        Assert.True(f.WorkingSize.Width * (long)f.WorkingSize.Height <= 2_000_000);
        Assert.InRange(f.WorkingScale, 1.9, 2.1);
        Assert.True(f.Keypoints.Max(k => k.X) > 3000);
        // The stored patch is the full-resolution neighbourhood of the keypoint.
        var p = f.Patch(0);
        Assert.Equal(full[p.CentreX, p.CentreY], p.Pixels[p.Radius * p.Side + p.Radius]);
    }
}
