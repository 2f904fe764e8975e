using System.Text.RegularExpressions;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Configuration;

/// <summary>Checks every setting against its allowed range; each message names the setting's full key.</summary>
/// <remarks>
/// Pure: it reports and never edits what it checks. Called by <see cref="SettingsLoader.Bind"/>, the one
/// place settings are bound, at start and on every reload. Not an <c>IValidateOptions</c> behind an
/// <c>IOptionsMonitor</c>: the monitor validates inside the configuration's reload callback and throws
/// there for a bad file, on a thread we do not own, where the service must instead log and keep the old settings.
/// </remarks>
internal static class SettingsValidator
{
    public static List<string> Check(SeamwrightOptions o)
    {
        var e = new List<string>();
        const string S = "Seamwright";
        Range(e, $"{S}:Service:RescanSeconds", o.Service.RescanSeconds, 1, 86400, "seconds");
        Range(e, $"{S}:Service:PollMilliseconds", o.Service.PollMilliseconds, 50, 60000, "milliseconds");
        Range(e, $"{S}:Service:StableSeconds", o.Service.StableSeconds, 0, 3600, "seconds");
        Range(e, $"{S}:Service:MaxParallelSets", o.Service.MaxParallelSets, 1, 64, "sets");
        Range(e, $"{S}:Service:MaxParallelJobs", o.Service.MaxParallelJobs, 1, 256, "jobs");
        Range(e, $"{S}:Service:MemoryBudgetMegabytes", o.Service.MemoryBudgetMegabytes, 16, 1048576, "MB");
        Range(e, $"{S}:Service:FeatureMemoryMegabytes", o.Service.FeatureMemoryMegabytes, 1, 1048576, "MB");
        Range(e, $"{S}:Service:QueueCapacity", o.Service.QueueCapacity, 16, 1000000, "entries");
        Range(e, $"{S}:Service:ShutdownSeconds", o.Service.ShutdownSeconds, 1, 600, "seconds");
        CheckState(e, $"{S}:State", o.State, o.Service);
        Range(e, $"{S}:Limits:MaxFileMegabytes", o.Limits.MaxFileMegabytes, 0.001, 1048576, "MB");
        Range(e, $"{S}:Limits:MaxMegapixels", o.Limits.MaxMegapixels, 0.0001, 100000, "megapixels");
        if (!EngineFactory.Names.Contains(o.Engine, StringComparer.Ordinal))
        {
            e.Add($"{S}:Engine is '{o.Engine}'; allowed: {string.Join(", ", EngineFactory.Names)}");
        }
        else if (o.Engine == ChecksumEngine.EngineName && Environment.GetEnvironmentVariable("SEAMWRIGHT_TEST_HOOKS") != "1")
        {
            // The checksum engine marks every pair accepted with an identity transform: it exists for
            // the service's own tests and must never serve real folders by a slip in the settings.
            e.Add($"{S}:Engine is '{o.Engine}', a test engine (allowed only with SEAMWRIGHT_TEST_HOOKS=1); use 'features'");
        }
        foreach (var (name, p) in o.Profiles)
        {
            CheckProfile(e, $"{S}:Profiles:{name}", p);
        }
        for (int i = 0; i < o.Roots.Count; i++)
        {
            CheckRoot(e, $"{S}:Roots:{i}", o.Roots[i], o, requirePath: true);
        }
        CheckRoot(e, $"{S}:Run", o.Run, o, requirePath: false);
        return e;
    }

    private static void CheckProfile(List<string> e, string k, ProfileSettings p)
    {
        Range(e, $"{k}:Pairing:NeighbourSpan", p.Pairing.NeighbourSpan, 2, 64, "images (at least 2 so that loops exist)");
        Range(e, $"{k}:Pairing:AllMaxPartners", p.Pairing.AllMaxPartners, 1, 1000, "images");
        Range(e, $"{k}:Pairing:AllMinSimilarity", p.Pairing.AllMinSimilarity, -1, 1, "(cosine)");
        Regex(e, $"{k}:Pairing:GridPattern", p.Pairing.GridPattern, ["row", "col"]);
        Range(e, $"{k}:RigLearnFromFirst", p.RigLearnFromFirst, 1, 100, "accepted results");
        Range(e, $"{k}:RigTolerancePx", p.RigTolerancePx, 0.01, 10000, "px");
        for (int i = 0; i < p.RigBaselines.Count; i++)
        {
            var b = p.RigBaselines[i];
            if (b.Transform.Length != 9 || !b.Transform.All(double.IsFinite) || b.Transform[8] == 0 || b.CameraA == b.CameraB)
            {
                e.Add($"{k}:RigBaselines:{i} ({b.CameraA} -> {b.CameraB}) is not usable; allowed: two different camera folders and a Transform of 9 finite numbers (3x3 row-major, A to B) with a non-zero last entry");
            }
        }
        Range(e, $"{k}:Completion:QuietSeconds", p.Completion.QuietSeconds, 0, 86400, "seconds");
        Range(e, $"{k}:Completion:ExpectedCount", p.Completion.ExpectedCount, 0, 1000000, "images (0 = not used)");
        Range(e, $"{k}:Completion:MaxWaitSeconds", p.Completion.MaxWaitSeconds, 1, 31 * 86400, "seconds");
        if (p.Completion.ReadyMarker.IndexOfAny(['/', '\\']) >= 0)
        {
            e.Add($"{k}:Completion:ReadyMarker is '{p.Completion.ReadyMarker}'; allowed: a file name without folders, or empty");
        }
        Range(e, $"{k}:Features:AnalysisMegapixels", p.Features.AnalysisMegapixels, 0.05, 100, "megapixels");
        Range(e, $"{k}:Features:MaxKeypoints", p.Features.MaxKeypoints, 16, 100000, "keypoints");
        for (int i = 0; i < p.Features.Masks.Count; i++)
        {
            var m = p.Features.Masks[i];
            if (m.X < 0 || m.Y < 0 || m.Width <= 0 || m.Height <= 0 || m.X + m.Width > 1 || m.Y + m.Height > 1)
            {
                e.Add($"{k}:Features:Masks:{i} is ({m.X}, {m.Y}, {m.Width}, {m.Height}); allowed: fractions of the image with X, Y >= 0, Width, Height > 0, X + Width <= 1, Y + Height <= 1");
            }
        }
        Range(e, $"{k}:Estimation:ThresholdPx", p.Estimation.ThresholdPx, 0.1, 100, "pixels");
        Range(e, $"{k}:Estimation:RatioTest", p.Estimation.RatioTest, 0.1, 1.0, "(ratio)");
        Range(e, $"{k}:Estimation:Confidence", p.Estimation.Confidence, 0.5, 0.999999, "(probability)");
        Range(e, $"{k}:Estimation:MaxIterations", p.Estimation.MaxIterations, 10, 10000000, "iterations");
        Range(e, $"{k}:Alignment:RobustScalePx", p.Alignment.RobustScalePx, 0.1, 100, "pixels");
        Range(e, $"{k}:Alignment:LinkResidualLimitPx", p.Alignment.LinkResidualLimitPx, 0.5, 1000, "pixels");
        Range(e, $"{k}:Alignment:PreviewMaxSide", p.Alignment.PreviewMaxSide, 64, 8192, "pixels");
        if (p.Alignment.ReferenceImage.Contains('/', StringComparison.Ordinal) || p.Alignment.ReferenceImage.Contains('\\', StringComparison.Ordinal))
        {
            e.Add($"{k}:Alignment:ReferenceImage is '{p.Alignment.ReferenceImage}'; allowed: a file name without folders, or empty (most connected image)");
        }
        foreach (var ext in p.Extensions)
        {
            if (!ext.StartsWith('.') || ext.Length < 2)
            {
                e.Add($"{k}:Extensions contains '{ext}'; allowed: extensions with a leading dot, like \".jpg\"");
            }
        }
    }

    private static void CheckRoot(List<string> e, string k, RootSettings r, SeamwrightOptions o, bool requirePath)
    {
        if (requirePath && string.IsNullOrWhiteSpace(r.Path))
        {
            e.Add($"{k}:Path is empty; allowed: the folder to watch");
        }
        if (!IsProfile(o, r.Profile))
        {
            e.Add($"{k}:Profile is '{r.Profile}'; allowed: one of the profiles ({ProfileNames(o)})");
        }
        for (int j = 0; j < r.ProfileRules.Count; j++)
        {
            if (!IsProfile(o, r.ProfileRules[j].Profile))
            {
                e.Add($"{k}:ProfileRules:{j}:Profile is '{r.ProfileRules[j].Profile}'; allowed: one of the profiles ({ProfileNames(o)})");
            }
        }
        if (!string.IsNullOrEmpty(r.SetPattern))
        {
            Regex(e, $"{k}:SetPattern", r.SetPattern, r.SetKeyGroups.ToArray());
        }
        if (r.OnSetDone.Length > 0 && Operations.HandoffProgram.Find(r.OnSetDone) is null)
        {
            e.Add($"{k}:OnSetDone is '{r.OnSetDone}', which is not an existing file; allowed: empty, or a program (a full path, or a name found on PATH; its arguments go in {k}:OnSetDoneArguments)");
        }
        Range(e, $"{k}:OnSetDoneTimeoutSeconds", r.OnSetDoneTimeoutSeconds, 1, 86400, "seconds");
    }

    private static void CheckState(List<string> e, string k, StateSettings s, ServiceSettings service)
    {
        if (!Pipeline.State.StateProviders.IsKnown(s.Provider))
        {
            e.Add($"{k}:Provider is '{s.Provider}'; allowed: {Pipeline.State.StateProviders.Sqlite}, {Pipeline.State.StateProviders.PostgreSql}");
        }
        else if (Pipeline.State.StateProviders.IsPostgreSql(s.Provider) && string.IsNullOrWhiteSpace(s.ConnectionString))
        {
            e.Add($"{k}:ConnectionString is empty; the {Pipeline.State.StateProviders.PostgreSql} provider needs an Npgsql connection string");
        }
        Range(e, $"{k}:LeaseSeconds", s.LeaseSeconds, 2, 3600, "seconds");
        Range(e, $"{k}:CommandTimeoutSeconds", s.CommandTimeoutSeconds, 1, 600, "seconds");
        if (service.NodeName.Length > 100 || service.NodeName.Any(char.IsControl))
        {
            e.Add("Seamwright:Service:NodeName is not usable; allowed: up to 100 printable characters (\"\" = the host name)");
        }
    }

    /// <summary>"default" always exists (<see cref="SeamwrightOptions.Profile"/> supplies it when not configured); the validator never adds it.</summary>
    private static bool IsProfile(SeamwrightOptions o, string name) => name == "default" || o.Profiles.ContainsKey(name);

    private static string ProfileNames(SeamwrightOptions o) => string.Join(", ", o.Profiles.Keys.Append("default").Distinct(StringComparer.Ordinal));

    [ThreadStatic]
    private static Dictionary<string, string>? _ranges;

    /// <summary>
    /// The allowed range of a numeric setting in words ("0 to 3600 seconds"), for a value of the
    /// wrong type; any profile or root index matches. Null when the key has no range.
    /// </summary>
    public static string? AllowedFor(string key)
    {
        ArgumentNullException.ThrowIfNull(key);
        _ranges = new Dictionary<string, string>(StringComparer.OrdinalIgnoreCase);
        try
        {
            var o = new SeamwrightOptions();
            o.Roots.Add(new RootSettings { Path = "." });
            o.Profiles.Add("default", new ProfileSettings()); // so that profile keys have their ranges too
            Check(o);
            return _ranges.GetValueOrDefault(Generic(key));
        }
        finally
        {
            _ranges = null;
        }
    }

    private static string Generic(string key) =>
        System.Text.RegularExpressions.Regex.Replace(key, @"(?<=:(Profiles|Roots):)[^:]+", "*", System.Text.RegularExpressions.RegexOptions.CultureInvariant, TimeSpan.FromSeconds(1));

    private static void Range(List<string> e, string key, double value, double min, double max, string unit)
    {
        _ranges?.TryAdd(Generic(key), $"{min} to {max} {unit}".TrimEnd());
        if (!(value >= min && value <= max))
        {
            e.Add($"{key} is {value}; allowed: {min} to {max} {unit}");
        }
    }

    private static void Regex(List<string> e, string key, string pattern, string[] groups)
    {
        try
        {
            var rx = new Regex(pattern, RegexOptions.CultureInvariant, TimeSpan.FromSeconds(1));
            var names = rx.GetGroupNames();
            foreach (var g in groups.Where(g => !names.Contains(g)))
            {
                e.Add($"{key} has no named group '{g}'; allowed: a regular expression with the groups {string.Join(", ", groups.Select(x => "(?<" + x + ">...)"))}");
            }
        }
        catch (ArgumentException x)
        {
            e.Add($"{key} is not a valid regular expression: {x.Message}");
        }
    }
}
