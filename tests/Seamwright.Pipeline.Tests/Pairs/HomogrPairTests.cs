using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Pairs;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Pairs;

/// <summary>
/// The 16 real pairs of the homogr set (Lebeda, Matas, Chum, BMVC 2012), scored by the mean
/// transfer error over the set's hand-annotated validation pairs (its README: a failure above 10 px).
/// </summary>
public class HomogrPairTests(ITestOutputHelper output)
{
    [Fact]
    public void Process_HomogrImagePairs_FourteenOfSixteenUnderTenPixelsAndMedianAtMostOnePointTwoFive()
    {
        var set = HomogrSet.TryLoad();
        if (set is null)
        {
            Assert.False(RepoPaths.IsCi, "homogr set missing at " + RepoPaths.HomogrFolder + " (required when CI=true)");
            output.WriteLine("SKIPPED: homogr set not found at " + RepoPaths.HomogrFolder);
            return;
        }
        var errors = new double[set.Count];
        var lines = new string[set.Count];
        // Parallel across pairs (never inside one estimate): results do not depend on the schedule.
        Parallel.For(0, set.Count, new ParallelOptions { MaxDegreeOfParallelism = 2 }, i =>
        {
            var p = set[i];
            var fa = ImageFeatureExtractor.Extract(TestImageFiles.LoadGray(p.ImageA), null, FeatureSettings.Default);
            var fb = ImageFeatureExtractor.Extract(TestImageFiles.LoadGray(p.ImageB), null, FeatureSettings.Default);
            var outcome = PairProcessor.Process(fa, fb, PairSettings.Default);
            var e = outcome.Estimate;
            errors[i] = e.Transform is { } h ? p.ValidationError(h) : double.PositiveInfinity;
            lines[i] = $"{p.Name,-14} err {errors[i],8:F2} px  {e.Status,-8} {e.FeaturePath.Word(),-11} feats {fa.Count}/{fb.Count} matches {outcome.MatchCount} "
                + $"inliers {e.Consensus.Sampling}/{e.Consensus.Final} reloc {outcome.RelocalizedCount} rms {e.RmsResidualPx:F2}  {string.Join("; ", e.Reasons)}";
        });
        foreach (var l in lines)
        {
            output.WriteLine(l);
        }
        int good = errors.Count(e => e < 10);
        double median = errors.Order().ElementAt(7) * 0.5 + errors.Order().ElementAt(8) * 0.5;
        output.WriteLine($"under 10 px: {good}/16, median {median:F2} px");
        // Measured with guided matching: 13/16, median 1.14 px (1.34 before); issue 13's target is a median of at most 1.25 px.
        // With the scale-space second look: 14/16, median 0.94 px (ExtremeZoom, rejected by the corners at 327 px, is
        // accepted at 0.35 px from scale-space features); corners alone stay at 13/16, 1.02 px.
        Assert.True(good >= 14, $"only {good} of 16 pairs under 10 px ({HomogrSet.Source})");
        Assert.True(median <= 1.25, $"median validation error {median:F2} px above 1.25 px ({HomogrSet.Source})");
    }
}
