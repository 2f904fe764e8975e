using System.Globalization;
using System.Net;
using System.Text;

namespace Seamwright.Pipeline.Report;

/// <summary>
/// The report's problem list, shown before everything else: rejected and weak pairs, links the
/// alignment left out, and images that were not placed (or were placed in a separate group),
/// worst first; long lists are cut with a count of the rest (the confidence table filters them all).
/// </summary>
internal static class ReportProblems
{
    /// <summary>Entries listed before the rest is summarised as a count.</summary>
    public const int MaxListed = 60;

    public static void Render(StringBuilder sb, SetReport report)
    {
        var items = new List<string>();
        foreach (var image in report.Images.Where(i => i.ToReference is null && !i.PlacedByCamera))
        {
            items.Add("Image " + E(image.Name) + " not placed" + (image.Note is null ? "" : ": " + E(image.Note)));
        }
        foreach (var p in report.Pairs.Where(p => p.Status == "rejected"))
        {
            items.Add(Pair(p, "rejected"));
        }
        foreach (var p in report.Pairs.Where(p => p.Status == "weak"))
        {
            items.Add(Pair(p, "weak"));
        }
        foreach (var p in report.Pairs.Where(p => p.Status != "rejected" && p.AlignmentNote is not null))
        {
            items.Add("Link " + E(p.ImageA) + " – " + E(p.ImageB) + " left out of the alignment: " + E(p.AlignmentNote!));
        }
        foreach (var image in report.Images.Where(i => i.ToReference is not null && i.Note is not null))
        {
            items.Add("Image " + E(image.Name) + ": " + E(image.Note!));
        }
        sb.Append("<section class=\"problems\"><h2>Problems</h2>");
        if (items.Count == 0)
        {
            sb.Append("<p>None: every pair accepted and every image placed.</p></section>\n");
            return;
        }
        sb.Append("<ul>");
        foreach (string item in items.Take(MaxListed))
        {
            sb.Append("<li>").Append(item).Append("</li>");
        }
        sb.Append("</ul>");
        if (items.Count > MaxListed)
        {
            sb.Append(string.Create(CultureInfo.InvariantCulture, $"<p>… and {items.Count - MaxListed} more; filter the confidence table below by status.</p>"));
        }
        sb.Append("</section>\n");
    }

    private static string Pair(ReportPair p, string what) =>
        "Pair " + E(p.ImageA) + " – " + E(p.ImageB) + " " + what + (p.Reasons.Count == 0 ? "" : ": " + E(string.Join("; ", p.Reasons)));

    private static string E(string s) => WebUtility.HtmlEncode(s);
}
