using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Tests.Settings;

public class SettingsFingerprintTests
{
    private static string Fp(ProfileSettings p) => SettingsFingerprint.ForSet(p, new LimitSettings(), "features", 1);

    [Fact]
    public void ForSet_CompletionChange_SameFingerprint()
    {
        var a = new ProfileSettings();
        var b = new ProfileSettings { Completion = new CompletionSettings { QuietSeconds = 99, ReadyMarker = "GO" } };
        Assert.Equal(Fp(a), Fp(b));
    }

    [Fact]
    public void ForSet_EveryResultShapingChange_NewFingerprint()
    {
        string basis = Fp(new ProfileSettings());
        var changes = new Action<ProfileSettings>[]
        {
            p => p.Estimation.ThresholdPx = 2.5,
            p => p.Estimation.Seed = 1,
            p => p.Estimation.MotionModel = Core.Estimation.MotionModel.Affine,
            p => p.Pairing.NeighbourSpan = 3,
            p => p.Pairing.Mode = PairingMode.All,
            p => p.Features.MaxKeypoints = 500,
            p => p.Features.AnalysisMegapixels = 3,
            p => p.Features.Masks.Add(new MaskRect { X = 0, Y = 0, Width = 0.1, Height = 0.1 }),
            p => p.Extensions.Add(".jpg"),
        };
        foreach (var change in changes)
        {
            var p = new ProfileSettings();
            change(p);
            Assert.NotEqual(basis, Fp(p));
        }
        Assert.NotEqual(basis, SettingsFingerprint.ForSet(new ProfileSettings(), new LimitSettings(), "features", 2));
    }

    [Fact]
    public void ForFeatures_EstimationChange_CacheKeyUnchanged()
    {
        var p = new ProfileSettings();
        string before = SettingsFingerprint.ForFeatures(p.Features, "features", "d1");
        p.Estimation.ThresholdPx = 1;
        Assert.Equal(before, SettingsFingerprint.ForFeatures(p.Features, "features", "d1"));
        p.Features.AnalysisMegapixels = 1;
        Assert.NotEqual(before, SettingsFingerprint.ForFeatures(p.Features, "features", "d1"));
    }
}

public class SettingsFingerprintStabilityTests
{
    /// <summary>
    /// Digests of the default settings as written by releases before the analysis-size setting was
    /// renamed: the rename must keep every recorded fingerprint (ledgers, feature and pair caches).
    /// </summary>
    [Fact]
    public void Fingerprints_DefaultAndChangedAnalysisSize_SameAsBeforeTheRename()
    {
        var p = new ProfileSettings();
        string a = SettingsFingerprint.ForSet(p, new LimitSettings(), "features", 1);
        string b = SettingsFingerprint.ForFeatures(p.Features, "features", "d1");
        p.Features.AnalysisMegapixels = 1.5;
        p.Features.Masks.Add(new MaskRect { X = 0.1, Y = 0.2, Width = 0.3, Height = 0.4 });
        string c = SettingsFingerprint.ForSet(p, new LimitSettings(), "features", 1);
        string d = SettingsFingerprint.ForFeatures(p.Features, "features", "d1");
        // The set digests (a, c) changed on purpose when the estimation settings gained ScaleSpaceLook and
        // AffineViews (2026-12-03: pair results can change, so recorded sets are processed again); before that
        // they were 848fe476a6b53e3e and 8b67ab88ee6305a0. They changed again when Alignment:Distortion's default
        // became Auto (2026-12-03: rotation sets may now estimate k1; were 9769ba564fac92a5 and 311a18f208940ad6).
        // The feature digests (b, d) are those before the rename.
        Assert.Equal(["9770568932e2c573", "8c1cd794d69d1bf8", "84fe52b2301e2c04", "1059b7bb61bf37a7"], new[] { a, b, c, d });
    }

    [Fact]
    public void FeaturesShape_HoldsEveryFeatureSetting()
    {
        var shaped = SettingsFingerprint.FeaturesShape(new FeatureSettings()).GetType().GetProperties().Select(p => p.Name).ToList();
        var settings = typeof(FeatureSettings).GetProperties().Select(p => p.Name).ToList();
        Assert.Equal(settings.Count, shaped.Count);
        Assert.Equal(settings.Where(n => n != nameof(FeatureSettings.AnalysisMegapixels)).Order(), shaped.Where(n => n != "WorkingMegapixels").Order());
    }
}
