using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;
using Seamwright.Pipeline.Processing;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Pairs;

/// <summary>The scale-space second look in the pair flow: when it runs, what it decides and how that is recorded.</summary>
public class ScaleSpaceLookTests(ITestOutputHelper output)
{
    [Fact]
    public void Process_HomogrExtremeZoom_RejectedByCornersAcceptedByTheSecondLook()
    {
        // homogr set (Lebeda, Matas, Chum, BMVC 2012): ExtremeZoom, scored by its hand-annotated validation pairs.
        var set = HomogrSet.TryLoad();
        if (set is null)
        {
            Assert.False(RepoPaths.IsCi, "homogr set missing at " + RepoPaths.HomogrFolder + " (required when CI=true)");
            output.WriteLine("SKIPPED: homogr set not found");
            return;
        }
        var p = set.Single(x => x.Name == "ExtremeZoom");
        var fa = ImageFeatureExtractor.Extract(TestImageFiles.LoadGray(p.ImageA), null, FeatureSettings.Default);
        var fb = ImageFeatureExtractor.Extract(TestImageFiles.LoadGray(p.ImageB), null, FeatureSettings.Default);
        var corners = PairProcessor.Process(fa, fb, PairSettings.Default with { ScaleSpace = null }).Estimate;
        var both = PairProcessor.Process(fa, fb, PairSettings.Default).Estimate;
        double error = both.Transform is { } h ? p.ValidationError(h) : double.PositiveInfinity;
        output.WriteLine($"corners: {corners.Status} {corners.Consensus.Final}; second look: {both.Status} {both.Consensus.Final} {both.FeaturePath}, {error:F2} px");
        output.WriteLine(string.Join(" | ", both.Terminations));
        Assert.Equal(PairStatus.Rejected, corners.Status);
        Assert.Equal(FeaturePath.Corners, corners.FeaturePath);
        Assert.Equal(PairStatus.Accepted, both.Status);
        Assert.Equal(FeaturePath.ScaleSpace, both.FeaturePath);
        Assert.True(error < 2, $"validation error {error:F2} px ({HomogrSet.Source})");
        Assert.Contains(both.Terminations, t => t.StartsWith("corner path: rejected", StringComparison.Ordinal));
    }

    [Fact]
    public void Process_WellTexturedNeighbours_NoSecondLook()
    {
        var scene = new ProceduralScene(8, SceneStyle.Courtyard);
        var a = SceneRenderer.Render(scene, 500, 400, Transform2D.Identity);
        var b = SceneRenderer.Render(scene, 500, 400, Transform2D.Translation(-60, 10));
        var e = Process(a, b).Estimate;
        Assert.Equal(PairStatus.Accepted, e.Status);
        Assert.Equal(FeaturePath.Corners, e.FeaturePath);
        Assert.DoesNotContain(e.Terminations, t => t.Contains("scale-space", StringComparison.Ordinal));
    }

    [Fact]
    public void Process_BlankPaperOrPeriodicPattern_SecondLookNotTried()
    {
        var blank = Process(ImageEffects.AddGaussianNoise(ImageEffects.Blank(400, 300, 205), 2.0, 1),
            ImageEffects.AddGaussianNoise(ImageEffects.Blank(400, 300, 198), 2.0, 2)).Estimate;
        var periodicA = ImageEffects.PeriodicPattern(400, 300, 40, 3);
        var periodic = Process(periodicA, ImageWarper.Warp(periodicA, Transform2D.Translation(13, 7), 400, 300, 128)).Estimate;
        foreach (var e in new[] { blank, periodic })
        {
            Assert.NotEqual(PairStatus.Accepted, e.Status);
            Assert.Equal(FeaturePath.Corners, e.FeaturePath);
            Assert.DoesNotContain(e.Terminations, t => t.Contains("scale-space", StringComparison.Ordinal));
        }
    }

    [Fact]
    public void Process_UnrelatedImages_SecondLookTriedAndSaidSo()
    {
        var a = SceneRenderer.Render(new ProceduralScene(8, SceneStyle.Courtyard), 480, 360, Transform2D.Identity);
        var b = SceneRenderer.Render(new ProceduralScene(21, SceneStyle.EstateMap), 480, 360, Transform2D.Identity);
        var e = Process(a, b).Estimate;
        output.WriteLine(string.Join(" | ", e.Terminations));
        Assert.Equal(PairStatus.Rejected, e.Status);
        Assert.Contains(e.Terminations, t => t.StartsWith("scale-space path:", StringComparison.Ordinal));
    }

    [Fact]
    public void PairResultCodec_ScaleSpaceEstimate_FeaturePathSurvives()
    {
        var estimate = new PairEstimate
        {
            Model = MotionModel.Homography, Transform = Transform2D.Translation(3, 4), MatchCount = 40, InlierIndices = [1, 2, 3],
            Consensus = new ConsensusFigures(3, 3, 3, 0), Threshold = 3, Seed = 7, Status = PairStatus.Weak, Reasons = ["r"],
            CornerSigmaPx = 0.5, RmsResidualPx = 0.4, Iterations = 10, LpCount = 0, Terminations = ["t"],
            TimingsMs = new EstimateTimings(1, 2, 3, 6), FeaturePath = FeaturePath.ScaleSpace,
        };
        var back = PairResultCodec.Decode(PairResultCodec.Encode(new PairAnalysis(estimate, [new Correspondence(1, 2, 3, 4)])));
        Assert.Equal(FeaturePath.ScaleSpace, back.Estimate.FeaturePath);
        Assert.Equal(FeaturePathWords.ScaleSpace, back.Estimate.FeaturePath.Word());
    }

    private static PairOutcome Process(GrayImage a, GrayImage b) =>
        PairProcessor.Process(ImageFeatureExtractor.Extract(a, null, FeatureSettings.Default),
            ImageFeatureExtractor.Extract(b, null, FeatureSettings.Default), PairSettings.Default);
}
