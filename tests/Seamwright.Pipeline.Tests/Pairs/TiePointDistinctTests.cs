using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Pairs;

/// <summary>
/// Every tie point of a pair is a distinct correspondence: a corner found on two pyramid levels
/// and re-localised twice onto the same anchor pixel must be counted once (it used to appear
/// twice, about 16 % of the demo's tie points, inflating the inlier count and shrinking the spread).
/// </summary>
public class TiePointDistinctTests(ITestOutputHelper output)
{
    [Fact]
    public void Process_RenderedPair_NoTwoTiePointsWithinHalfAPixelInBothImages()
    {
        var scene = new ProceduralScene(8, SceneStyle.Courtyard);
        var truth = SyntheticPairTests.View(500, 400, 12, 1.05, 0.0001);
        var a = SceneRenderer.Render(scene, 500, 400, Transform2D.Identity);
        var b = SceneRenderer.Render(scene, 500, 400, truth.Inverse());
        var outcome = PairProcessor.Process(ImageFeatureExtractor.Extract(a, null, FeatureSettings.Default),
            ImageFeatureExtractor.Extract(b, null, FeatureSettings.Default), PairSettings.Default);
        var ties = outcome.TiePoints;
        int repeats = 0;
        for (int i = 0; i < ties.Length; i++)
        {
            for (int j = 0; j < i; j++)
            {
                if (Math.Abs(ties[i].X1 - ties[j].X1) <= 0.5 && Math.Abs(ties[i].Y1 - ties[j].Y1) <= 0.5
                    && Math.Abs(ties[i].X2 - ties[j].X2) <= 0.5 && Math.Abs(ties[i].Y2 - ties[j].Y2) <= 0.5)
                {
                    repeats++;
                    break;
                }
            }
        }
        output.WriteLine($"{ties.Length} tie points, {repeats} repeats, {outcome.RelocalizedCount} re-localised, inliers {outcome.Estimate.Consensus.Final}");
        Assert.True(ties.Length >= 100, $"only {ties.Length} tie points");
        Assert.Equal(0, repeats);
        Assert.Equal(ties.Length, outcome.Estimate.Consensus.Final);
    }
}
