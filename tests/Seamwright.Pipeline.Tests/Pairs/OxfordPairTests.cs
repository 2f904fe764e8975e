using System.Collections.Concurrent;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Pairs;

/// <summary>The whole pair flow on the 40 Oxford pairs, scored as the set's README says (10 x 10 grid, success at most 5 px).</summary>
public class OxfordPairTests(ITestOutputHelper output)
{
    [Fact]
    public void Process_OxfordPairs_AtLeastThirtyNineWithinFivePixels()
    {
        var set = OxfordSet.TryLoad();
        if (set is null)
        {
            Assert.False(RepoPaths.IsCi, "Oxford set missing at " + OxfordSet.Folder + " (required when CI=true)");
            output.WriteLine("SKIPPED: Oxford set not found at " + OxfordSet.Folder);
            return;
        }
        var features = new ConcurrentDictionary<string, Lazy<(ImageFeatures F, int W, int H)>>();
        (ImageFeatures F, int W, int H) Load(string path) => features.GetOrAdd(path, p => new(() =>
        {
            var img = TestImageFiles.LoadGray(p);
            return (ImageFeatureExtractor.Extract(img, null, FeatureSettings.Default), img.Width, img.Height);
        })).Value;
        var errors = new double[set.Count];
        var lines = new string[set.Count];
        Parallel.For(0, set.Count, new ParallelOptions { MaxDegreeOfParallelism = 2 }, i =>
        {
            var p = set[i];
            var a = Load(p.ImageA);
            var b = Load(p.ImageB);
            var outcome = PairProcessor.Process(a.F, b.F, PairSettings.Default);
            var e = outcome.Estimate;
            errors[i] = e.Transform is { } h && e.Status != PairStatus.Rejected ? p.GridError(h, a.W, a.H, b.W, b.H) : double.PositiveInfinity;
            lines[i] = $"{p.Name,-10} err {errors[i],8:F2} px  {e.Status,-8} {e.FeaturePath.Word(),-11} matches {outcome.MatchCount} inliers {e.Consensus.Final}";
        });
        foreach (var l in lines)
        {
            output.WriteLine(l);
        }
        int good = errors.Count(e => e <= 5);
        var sorted = errors.Order().ToArray();
        double median = 0.5 * (sorted[19] + sorted[20]);
        output.WriteLine($"within 5 px: {good}/40, median {median:F2} px");
        // Measured before issue 13's work: 35/40, median 0.68 px; with guided matching and 8 levels 37/40, 0.60 px.
        // With the second look (2026-12-03): 39/40, median 0.55 px; graf 1-6 (0.38 px) and wall 1-6 (1.92 px), rejected by
        // corners and plain scale-space features alike, are decided by the tilted views. Only boat 1-6 (6.2 px) misses.
        Assert.True(good >= 39, $"only {good} of 40 within 5 px ({OxfordSet.Source})");
        Assert.True(median <= 0.58, $"median {median:F2} px above 0.58 px ({OxfordSet.Source})");
    }
}
