using Microsoft.Extensions.Configuration;
using Seamwright.Host.Configuration;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Tests.Configuration;

public class RenamedSettingsTests
{
    private static SeamwrightOptions Bind(List<string> warningsOut, params (string Key, string Value)[] values)
    {
        var config = new ConfigurationBuilder()
            .AddInMemoryCollection(values.Select(v => new KeyValuePair<string, string?>(v.Key, v.Value)))
            .Build();
        var options = SettingsLoader.Bind(config, out var warnings);
        warningsOut.AddRange(warnings);
        return options;
    }

    private static string Fp(SeamwrightOptions o, string profile) => SettingsFingerprint.ForSet(o.Profile(profile), o.Limits, o.Engine, 1);

    [Fact]
    public void OldKey_ValueTakenWithWarningNamingTheNewKey_SameFingerprintAsTheNewKey()
    {
        var oldWarnings = new List<string>();
        var old = Bind(oldWarnings, ("Seamwright:Profiles:scans:Features:WorkingMegapixels", "1.25"));
        var fresh = Bind(new List<string>(), ("Seamwright:Profiles:scans:Features:AnalysisMegapixels", "1.25"));

        Assert.Equal(1.25, old.Profile("scans").Features.AnalysisMegapixels);
        var w = Assert.Single(oldWarnings);
        Assert.Contains("Seamwright:Profiles:scans:Features:WorkingMegapixels is deprecated", w, StringComparison.Ordinal);
        Assert.Contains("rename it to Seamwright:Profiles:scans:Features:AnalysisMegapixels", w, StringComparison.Ordinal);
        Assert.Equal(Fp(fresh, "scans"), Fp(old, "scans"));
        Assert.NotEqual(Fp(new SeamwrightOptions(), "default"), Fp(old, "scans"));
    }

    [Fact]
    public void BothKeys_NewKeyWinsAndTheOldIsNamedAsIgnored()
    {
        var warnings = new List<string>();
        var o = Bind(warnings, ("Seamwright:Profiles:default:Features:WorkingMegapixels", "1"), ("Seamwright:Profiles:default:Features:AnalysisMegapixels", "3"));
        Assert.Equal(3, o.Profile("default").Features.AnalysisMegapixels);
        Assert.Contains("ignored because Seamwright:Profiles:default:Features:AnalysisMegapixels is set", Assert.Single(warnings), StringComparison.Ordinal);
    }

    [Fact]
    public void NewKeyOnly_NoWarning()
    {
        var warnings = new List<string>();
        Bind(warnings, ("Seamwright:Profiles:default:Features:AnalysisMegapixels", "3"));
        Assert.Empty(warnings);
    }

    [Fact]
    public void OldKey_OutOfRangeOrWrongType_RefusedWithTheAllowedRange()
    {
        var range = Assert.Throws<SettingsException>(() => Bind(new List<string>(), ("Seamwright:Profiles:default:Features:WorkingMegapixels", "500")));
        Assert.Contains("Features:AnalysisMegapixels is 500; allowed: 0.05 to 100 megapixels", range.Message, StringComparison.Ordinal);
        var type = Assert.Throws<SettingsException>(() => Bind(new List<string>(), ("Seamwright:Profiles:default:Features:WorkingMegapixels", "big")));
        Assert.Contains("'big' at 'Seamwright:Profiles:default:Features:WorkingMegapixels'", type.Message, StringComparison.Ordinal);
        Assert.Contains("allowed: 0.05 to 100 megapixels", type.Message, StringComparison.Ordinal);
    }
}
