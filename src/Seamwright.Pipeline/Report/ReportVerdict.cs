using System.Globalization;
using System.Net;
using System.Text;
using Seamwright.Core.Alignment;

namespace Seamwright.Pipeline.Report;

/// <summary>
/// Where a report came from: the input folder, when it was made, the tool version, the settings
/// that shaped it (values), and the files that are not in it (bad, skipped) with their reasons.
/// </summary>
/// <param name="InputFolder">The set's folder (or root) as read.</param>
/// <param name="TimeUtc">When the run wrote its outputs (UTC).</param>
/// <param name="ToolVersion">The tool version.</param>
/// <param name="Settings">The result-shaping settings of the set's profile, label and value.</param>
/// <param name="LeftOut">Bad or skipped input files: name and reason.</param>
public sealed record ReportProvenance(string InputFolder, DateTime TimeUtc, string ToolVersion, IReadOnlyList<ReportFact> Settings, IReadOnlyList<ReportFact> LeftOut);

/// <summary>The verdict: its level (usable, usable with gaps, not usable) and the sentence.</summary>
public sealed record VerdictText(string Level, string Text);

/// <summary>The report's opening verdict in words, and the section that carries it with the provenance.</summary>
public static class ReportVerdict
{
    /// <summary>Marks around what differs between two runs of the same inputs (time, folder), so comparisons can drop it.</summary>
    public const string VolatileStart = "<!--volatile-->";
    public const string VolatileEnd = "<!--/volatile-->";

    /// <summary>
    /// "usable: 9 of 9 images placed, 12 of 12 expected pairs accepted", or "usable with gaps: ..."
    /// (some images unplaced or files left out) or "not usable: ..." (fewer than two images placed),
    /// followed by what blocks it. An image with no transform into the reference plane that its
    /// camera block places (<paramref name="offPlane"/> non-null: a rotation set's frame looking
    /// away from the reference) counts as placed.
    /// </summary>
    public static VerdictText Judge(SetAlignment alignment, IReadOnlyList<ReportPair> pairs, IReadOnlyList<string> names, int leftOut,
        IReadOnlyList<string?>? offPlane = null)
    {
        ArgumentNullException.ThrowIfNull(alignment);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(names);
        int images = alignment.Images.Length;
        int byCamera = ByCameraOnly(alignment, offPlane);
        int placed = alignment.PlacedCount + byCamera;
        int accepted = pairs.Count(p => p.Status == "accepted");
        string how = byCamera > 0 ? F($" ({byCamera} by their camera only)") : "";
        string figures = F($"{placed} of {images + leftOut} images placed{how}, {accepted} of {pairs.Count} expected pairs accepted");
        var blockers = new List<string>();
        if (leftOut > 0)
        {
            blockers.Add(F($"{leftOut} input files unusable (listed below)"));
        }
        int unplaced = alignment.Images.Length - placed;
        if (unplaced > 0)
        {
            blockers.Add(F($"{unplaced} images not placed"));
        }
        if (alignment.IsSplit)
        {
            blockers.Add(F($"the set splits into {alignment.Components.Length} unlinked groups"));
        }
        if (pairs.Count - accepted > 0)
        {
            blockers.Add(F($"{pairs.Count - accepted} pairs weak or rejected"));
        }
        string level = placed < 2 ? "not usable" : blockers.Count == 0 ? "usable" : "usable with gaps";
        return new VerdictText(level, level + ": " + figures + (blockers.Count == 0 ? "" : " (" + string.Join("; ", blockers) + ")"));
    }

    /// <summary>The verdict section: verdict, run facts, settings, and every bad, skipped and unplaced file with its reason.</summary>
    public static void Render(StringBuilder sb, SetReport report)
    {
        ArgumentNullException.ThrowIfNull(sb);
        ArgumentNullException.ThrowIfNull(report);
        if (report.Verdict is not { } verdict)
        {
            return;
        }
        string cls = verdict.Level == "usable" ? "st-accepted" : verdict.Level == "not usable" ? "st-rejected" : "st-weak";
        sb.Append("<section id=\"verdict\" class=\"verdict\"><h2>Verdict</h2><p class=\"chip ").Append(cls).Append("\">").Append(E(verdict.Text)).Append("</p>");
        if (report.Provenance is { } p)
        {
            sb.Append("<dl>");
            sb.Append("<dt>Input folder</dt><dd>").Append(VolatileStart).Append(E(p.InputFolder)).Append(VolatileEnd).Append("</dd>");
            sb.Append("<dt>Run</dt><dd>").Append(E(report.RunId)).Append(", written ").Append(VolatileStart)
              .Append(E(p.TimeUtc.ToString("yyyy-MM-dd HH:mm:ss 'UTC'", CultureInfo.InvariantCulture))).Append(VolatileEnd).Append("</dd>");
            sb.Append("<dt>Tool version</dt><dd>").Append(E(p.ToolVersion)).Append("</dd>");
            sb.Append("<dt>Settings</dt><dd>").Append(string.Join(", ", p.Settings.Select(s => E(s.Label) + " " + E(s.Value))))
              .Append(" (fingerprint <code>").Append(E(report.Fingerprint)).Append("</code>)</dd>");
            sb.Append("</dl>");
        }
        var leftOut = report.Provenance?.LeftOut ?? [];
        var unplaced = report.Images.Where(i => i.ToReference is null && !i.PlacedByCamera).ToList();
        if (leftOut.Count + unplaced.Count > 0)
        {
            sb.Append("<h3>Not in the result</h3><ul id=\"left-out\">");
            foreach (var f in leftOut)
            {
                sb.Append("<li><b>").Append(E(f.Label)).Append("</b>: unusable, ").Append(E(f.Value)).Append("</li>");
            }
            foreach (var i in unplaced)
            {
                sb.Append("<li><b>").Append(E(i.Name)).Append("</b>: not placed, ").Append(E(i.Note ?? "no accepted link to the placed images")).Append("</li>");
            }
            sb.Append("</ul>");
        }
        sb.Append("</section>\n");
    }

    /// <summary>Images without a plane transform whose camera block places them.</summary>
    public static int ByCameraOnly(SetAlignment alignment, IReadOnlyList<string?>? offPlane)
    {
        ArgumentNullException.ThrowIfNull(alignment);
        return offPlane is null ? 0 : alignment.Images.Count(p => !p.IsPlaced && p.Index < offPlane.Count && offPlane[p.Index] is not null);
    }

    private static string E(string s) => WebUtility.HtmlEncode(s);

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
