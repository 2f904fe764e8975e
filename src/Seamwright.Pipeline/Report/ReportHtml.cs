using Seamwright.Core.Estimation;
using System.Globalization;
using System.Net;
using System.Text;

namespace Seamwright.Pipeline.Report;

/// <summary>
/// Renders a set report as one self-contained HTML file: the preview and thumbnails inline as
/// data URIs, the pair graph as inline SVG, a sortable confidence table, per-pair details and the
/// settings fingerprint. Deterministic: the same report gives the same bytes.
/// </summary>
public static class ReportHtml
{
    /// <summary>Label of the Alignment panel's row naming the model each pair was estimated in.</summary>
    public const string PairModelLabel = "Pair model";

    public static string Render(SetReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var sb = new StringBuilder();
        sb.Append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">");
        sb.Append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">");
        sb.Append("<title>").Append(E(report.SetName)).Append(" · Seamwright report</title>");
        sb.Append("<style>").Append(ReportAssets.Css).Append("</style></head>\n<body>\n");
        Header(sb, report);
        sb.Append("<main>\n");
        ReportVerdict.Render(sb, report);
        if (report.Warnings.Count > 0)
        {
            sb.Append("<section class=\"warn\"><h2>Look at these</h2><ul>");
            foreach (var w in report.Warnings)
            {
                sb.Append("<li>").Append(E(w)).Append("</li>");
            }
            sb.Append("</ul></section>\n");
        }
        ReportProblems.Render(sb, report);
        sb.Append("<div class=\"top\">");
        sb.Append("<section><h2>Preview</h2>");
        if (report.PreviewJpeg is { Length: > 0 } preview)
        {
            sb.Append("<figure><img id=\"preview\" alt=\"preview mosaic of ").Append(E(report.SetName)).Append("\" src=\"data:image/jpeg;base64,")
              .Append(Convert.ToBase64String(preview)).Append("\"><figcaption>Low-resolution mosaic in the reference frame (feathered blend). Ghosting marks parallax or a wrong link.</figcaption></figure>");
        }
        else
        {
            sb.Append("<p>No preview: nothing could be placed.</p>");
        }
        sb.Append("</section><section><h2>Alignment</h2><dl>");
        // One name per model: the set model (what placed the images, and why) and the pairs' model (what each pair was estimated in).
        var facts = report.Facts.ToList();
        if (!facts.Any(f => f.Label == SetModelSummary.SetModelLabel))
        {
            facts.Insert(0, new ReportFact(SetModelSummary.SetModelLabel, report.MotionModel));
        }
        int after = facts.FindIndex(f => f.Label == SetModelSummary.SetModelLabel) + 1;
        if (after < facts.Count && facts[after].Label == SetModelSummary.ReasonLabel)
        {
            after++;
        }
        if (report.PairModel is { } pairModel)
        {
            facts.Insert(after, new ReportFact(PairModelLabel, pairModel + " (each pair's estimate)"));
        }
        foreach (var f in facts)
        {
            string wide = f.Prose ? " class=\"wide\"" : "";
            sb.Append("<dt").Append(wide).Append('>').Append(E(f.Label)).Append("</dt><dd").Append(f.Prose ? " class=\"wide prose\"" : "").Append('>')
              .Append(E(f.Value)).Append("</dd>");
        }
        sb.Append("</dl></section></div>\n");
        sb.Append("<section><h2>Pair graph</h2>").Append(PairGraphSvg.Render(report));
        sb.Append("<div class=\"legend\">").Append(Key("var(--ok)", "", "accepted")).Append(Key("var(--weak)", "6 3", "weak"))
          .Append(Key("var(--bad)", "0.1 4", "rejected")).Append(Key("var(--out)", "8 3 0.1 3", "left out of the alignment"))
          .Append("<span>nodes at the images' aligned centres; numbers (where they fit): image order below; filled: reference</span></div></section>\n");
        Table(sb, report);
        Details(sb, report);
        Images(sb, report);
        sb.Append("</main>\n<footer>Settings fingerprint <code>").Append(E(report.Fingerprint)).Append("</code> · run <code>").Append(E(report.RunId))
          .Append("</code><br>toReference maps an image's full-resolution pixels (centres at integer coordinates) to the reference image's pixels, 3x3 row-major.</footer>\n");
        sb.Append("<script>").Append(ReportAssets.Script).Append("</script>\n</body></html>\n");
        return sb.ToString();
    }

    private static string Key(string colour, string dash, string label) =>
        "<span><svg width=\"28\" height=\"8\" aria-hidden=\"true\"><line x1=\"2\" y1=\"4\" x2=\"26\" y2=\"4\" stroke-width=\"2\" style=\"stroke:" + colour
        + "\"" + (dash.Length > 0 ? " stroke-dasharray=\"" + dash + "\"" : "") + "/></svg> " + label + "</span>";

    private static void Header(StringBuilder sb, SetReport report)
    {
        int accepted = report.Pairs.Count(p => p.Status == "accepted");
        int weak = report.Pairs.Count(p => p.Status == "weak");
        int rejected = report.Pairs.Count - accepted - weak;
        sb.Append("<header>").Append(ReportAssets.Mark).Append("<div><h1>").Append(E(report.SetName)).Append("</h1><div class=\"sub\">")
          .Append(F($"{report.Images.Count} images · {report.Pairs.Count} pairs · run ")).Append(E(report.RunId)).Append("</div></div>");
        sb.Append("<div class=\"chips\">")
          .Append(CountChip("accepted", accepted)).Append(CountChip("weak", weak)).Append(CountChip("rejected", rejected))
          .Append("</div></header>\n");
    }

    /// <summary>A header count: in its status colour when there is something to count, quiet (class zero) at zero.</summary>
    private static string CountChip(string status, int count) =>
        F($"<span class=\"chip st-{status}{(count == 0 ? " zero" : "")}\">{count} {status}</span>");

    private static void Table(StringBuilder sb, SetReport report)
    {
        sb.Append("<section><h2>Confidence</h2><div class=\"pager\"><input id=\"filter\" type=\"search\" placeholder=\"filter by image name\" aria-label=\"filter by image name\">")
          .Append("<select id=\"status\" aria-label=\"status\"><option value=\"\">every status</option><option>accepted</option><option>weak</option><option>rejected</option></select>")
          .Append("<button type=\"button\" id=\"prev\">previous</button><span id=\"page\"></span><button type=\"button\" id=\"next\">next</button></div>");
        sb.Append("<table id=\"pairs\"><thead><tr>");
        foreach (var (label, type) in new[] { ("Image A", "text"), ("Image B", "text"), ("Status", "text"), ("Inliers", "num"), ("Matches", "num"), ("Inlier ratio", "num"), ("RMS px", "num"), ("Corner σ px", "num") })
        {
            sb.Append("<th data-type=\"").Append(type).Append("\"><button type=\"button\">").Append(E(label)).Append("</button></th>");
        }
        sb.Append("</tr></thead><tbody>");
        for (int i = 0; i < report.Pairs.Count; i++)
        {
            var p = report.Pairs[i];
            double ratio = p.Matches > 0 ? (double)p.Inliers / p.Matches : 0;
            sb.Append(F($"<tr data-i=\"{i}\"")).Append(p.AlignmentNote is null ? "" : " class=\"out\"").Append('>');
            Cell(sb, p.ImageA);
            Cell(sb, p.ImageB);
            sb.Append("<td data-v=\"").Append(E(p.Status)).Append("\"><span class=\"chip st-").Append(E(p.Status)).Append("\">").Append(E(p.Status)).Append("</span></td>");
            Num(sb, p.Inliers, "0");
            Num(sb, p.Matches, "0");
            Num(sb, ratio, "0.00");
            Num(sb, p.RmsPx, "0.00");
            Num(sb, p.CornerSigmaPx, "0.00");
            sb.Append("</tr>");
        }
        sb.Append("</tbody></table></section>\n");
    }

    /// <summary>Above this many pairs only the pairs with a problem get a details entry (the table has every pair).</summary>
    public const int AllDetailsUpTo = 200;

    private static void Details(StringBuilder sb, SetReport report)
    {
        bool all = report.Pairs.Count <= AllDetailsUpTo;
        sb.Append(all ? "<section><h2>Pair details</h2>" : "<section><h2>Pair details (pairs with a problem)</h2>");
        for (int i = 0; i < report.Pairs.Count; i++)
        {
            var p = report.Pairs[i];
            if (!all && p.Status == "accepted" && p.AlignmentNote is null)
            {
                continue;
            }
            sb.Append("<details><summary><span class=\"chip st-").Append(E(p.Status)).Append("\">").Append(E(p.Status)).Append("</span> ")
              .Append(E(p.ImageA)).Append(" – ").Append(E(p.ImageB)).Append("</summary><ul>");
            sb.Append(F($"<li>{p.Inliers} inliers of {p.Matches} matches; RMS {p.RmsPx:0.###} px; corner σ {p.CornerSigmaPx:0.###} px</li>"));
            if (p.FeaturePath != FeaturePathWords.Corners)
            {
                sb.Append("<li>decided by the ").Append(E(p.FeaturePath)).Append(" features (the corner features left this pair undecided)</li>");
            }
            foreach (var r in p.Reasons)
            {
                sb.Append("<li>").Append(E(r)).Append("</li>");
            }
            if (p.AlignmentNote is not null)
            {
                sb.Append("<li class=\"note\">").Append(E(p.AlignmentNote)).Append("</li>");
            }
            sb.Append("</ul></details>");
        }
        sb.Append("</section>\n");
    }

    /// <summary>Above this many images the per-image matrices are left out (each sidecar holds its toReference).</summary>
    public const int MatricesUpTo = 500;

    private static void Images(StringBuilder sb, SetReport report)
    {
        sb.Append("<section><h2>Images</h2><div class=\"thumbs\">");
        for (int i = 0; i < report.Images.Count; i++)
        {
            var image = report.Images[i];
            sb.Append("<div class=\"thumb\">");
            if (image.ThumbnailJpeg is { Length: > 0 } t)
            {
                sb.Append("<img class=\"thumbnail\" alt=\"").Append(E(image.Name)).Append("\" src=\"data:image/jpeg;base64,").Append(Convert.ToBase64String(t)).Append("\">");
            }
            sb.Append(F($"<div class=\"name\">{i + 1}. ")).Append(E(image.Name));
            if (image.IsReference)
            {
                sb.Append("<span class=\"badge\">reference</span>");
            }
            sb.Append(F($"</div><div class=\"meta\">{image.Width} x {image.Height} px</div>"));
            if (image.Note is not null)
            {
                sb.Append("<div class=\"meta note\">").Append(E(image.Note)).Append("</div>");
            }
            if (image.ToReference is { Length: 9 } m && report.Images.Count <= MatricesUpTo)
            {
                sb.Append("<table class=\"m\" title=\"toReference (3x3, row-major)\">");
                for (int r = 0; r < 3; r++)
                {
                    sb.Append("<tr>");
                    for (int c = 0; c < 3; c++)
                    {
                        sb.Append("<td>").Append(m[3 * r + c].ToString("G5", CultureInfo.InvariantCulture)).Append("</td>");
                    }
                    sb.Append("</tr>");
                }
                sb.Append("</table>");
            }
            sb.Append("</div>");
        }
        sb.Append("</div></section>\n");
    }

    private static void Cell(StringBuilder sb, string text) =>
        sb.Append("<td data-v=\"").Append(E(text)).Append("\">").Append(E(text)).Append("</td>");

    private static void Num(StringBuilder sb, double value, string format)
    {
        if (!double.IsFinite(value))
        {
            sb.Append("<td class=\"n\" data-v=\"-1e308\">–</td>");
            return;
        }
        string v = value.ToString("R", CultureInfo.InvariantCulture);
        sb.Append("<td class=\"n\" data-v=\"").Append(v).Append("\">").Append(value.ToString(format, CultureInfo.InvariantCulture)).Append("</td>");
    }

    private static string E(string s) => WebUtility.HtmlEncode(s);

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
