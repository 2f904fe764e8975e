using System.Globalization;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Report;

/// <summary>Builds a report's provenance from a set, its profile and its unusable files.</summary>
public static class ReportProvenanceBuilder
{
    public static ReportProvenance For(SetInputs set, ProfileSettings profile, DateTime timeUtc, string toolVersion, IEnumerable<(string File, string Reason)> leftOut)
    {
        ArgumentNullException.ThrowIfNull(set);
        ArgumentNullException.ThrowIfNull(profile);
        ArgumentNullException.ThrowIfNull(leftOut);
        return new ReportProvenance(InputFolder(set), timeUtc, toolVersion, Settings(profile),
            leftOut.Select(l => new ReportFact(l.File, l.Reason)).ToList());
    }

    /// <summary>The one folder holding every input of the set, else the watched root it came from.</summary>
    public static string InputFolder(SetInputs set)
    {
        ArgumentNullException.ThrowIfNull(set);
        var folders = set.Files.Select(f => Path.GetDirectoryName(f.FullPath) ?? "").Distinct(StringComparer.Ordinal).ToList();
        if (folders.Count == 1)
        {
            return folders[0];
        }
        var first = set.Files.FirstOrDefault();
        return first is null ? set.SetId : first.FullPath[..^first.RootPath.Length].TrimEnd('/', '\\');
    }

    /// <summary>The set-model setting in words (the model chosen is in the Alignment panel).</summary>
    public static string SetModelSetting(SetModelKind kind) => kind switch
    {
        SetModelKind.Auto => "auto (rotation when warranted, else the lowest-freedom planar model)",
        SetModelKind.Planar => "planar (the pair model)",
        _ => "rotation",
    };

    /// <summary>The result-shaping settings a reader needs to judge the result, with their values.</summary>
    public static IReadOnlyList<ReportFact> Settings(ProfileSettings p)
    {
        ArgumentNullException.ThrowIfNull(p);
        string I(double v) => v.ToString("0.###", CultureInfo.InvariantCulture);
        return
        [
            new("pair model", MotionFamily.Of(p.Estimation.MotionModel).Name),
            new("set model", SetModelSetting(p.Alignment.SetModel)),
            new("threshold", I(p.Estimation.ThresholdPx) + " px"),
            new("seed", p.Estimation.Seed.ToString(CultureInfo.InvariantCulture)),
            new("consensus refinement", p.Estimation.RefineConsensus ? "on" : "off"),
            new("scale-space second look", p.Estimation.ScaleSpaceLook ? (p.Estimation.AffineViews ? "on, with tilted views" : "on") : "off"),
            new("ratio test", I(p.Estimation.RatioTest)),
            new("pairing", p.Pairing.Mode.ToString().ToLowerInvariant() + ", neighbour span " + p.Pairing.NeighbourSpan.ToString(CultureInfo.InvariantCulture)),
            new("corners per image", p.Features.MaxKeypoints.ToString(CultureInfo.InvariantCulture)),
            new("analysis size", I(p.Features.AnalysisMegapixels) + " MP"),
            new("weak links in the alignment", p.Alignment.IncludeWeakLinks ? "yes" : "no"),
        ];
    }
}
