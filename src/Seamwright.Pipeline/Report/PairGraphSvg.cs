using System.Globalization;
using System.Net;
using System.Text;

namespace Seamwright.Pipeline.Report;

/// <summary>
/// The pair graph as inline SVG: one node per image at its centre in the reference frame, so the
/// graph has the shape of the mosaic (unplaced images in rows below), one edge per pair styled by
/// status. Nodes shrink with the spacing of their neighbours and carry their number only where it
/// fits; dash styles are the main cue (solid accepted, dashed weak, dotted rejected, dash-dot left
/// out), colours a second one (see <see cref="ReportAssets"/>), so the graph also reads in gray.
/// </summary>
internal static class PairGraphSvg
{
    private const double Margin = 36;

    /// <summary>Below this node radius (SVG units) numbers are left out (judgement: 11 px monospace digits need about 8).</summary>
    private const double LabelRadius = 8;

    public static string Render(SetReport report)
    {
        var index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (int i = 0; i < report.Images.Count; i++)
        {
            index.TryAdd(report.Images[i].Name, i);
        }
        double width = WidthFor(report.Images.Count);
        var positions = Layout(report.Images, width, out double height);
        double radius = NodeRadius(positions, report.Images);
        var sb = new StringBuilder();
        sb.Append(F($"<svg class=\"graph\" viewBox=\"0 0 {width:0} {height:0}\" role=\"img\" aria-label=\"pair graph\">"));
        sb.Append(F($"<g class=\"edges\" stroke-width=\"{Math.Clamp(radius / 4, 0.6, 3):0.##}\">"));
        for (int p = 0; p < report.Pairs.Count; p++)
        {
            var pair = report.Pairs[p];
            if (!index.TryGetValue(pair.ImageA, out int a) || !index.TryGetValue(pair.ImageB, out int b))
            {
                continue;
            }
            double u = Math.Clamp(radius / 4, 0.6, 3); // dash lengths in stroke widths
            var (colour, dash) = pair.AlignmentNote is not null ? ("var(--out)", F($"{4 * u:0.#} {1.5 * u:0.#} {0.1:0.#} {1.5 * u:0.#}"))
                : pair.Status switch
                {
                    "accepted" => ("var(--ok)", ""),
                    "weak" => ("var(--weak)", F($"{3 * u:0.#} {1.5 * u:0.#}")),
                    _ => ("var(--bad)", F($"{0.1:0.#} {2 * u:0.#}")),
                };
            sb.Append(F($"<line id=\"edge-{p}\" x1=\"{positions[a].X:0.#}\" y1=\"{positions[a].Y:0.#}\" x2=\"{positions[b].X:0.#}\" y2=\"{positions[b].Y:0.#}\" style=\"stroke:{colour}\""));
            if (dash.Length > 0)
            {
                sb.Append(F($" stroke-dasharray=\"{dash}\""));
            }
            sb.Append("><title>").Append(WebUtility.HtmlEncode($"{pair.ImageA} - {pair.ImageB}: {pair.Status}")).Append("</title></line>");
        }
        sb.Append("</g>");
        bool labels = radius >= LabelRadius;
        for (int i = 0; i < report.Images.Count; i++)
        {
            var image = report.Images[i];
            string cls = image.IsReference ? "ref" : image.ToReference is null ? "unplaced" : "";
            sb.Append(F($"<g><circle data-i=\"{i}\" r=\"{radius:0.#}\" cx=\"{positions[i].X:0.#}\" cy=\"{positions[i].Y:0.#}\" class=\"{cls}\"><title>"));
            sb.Append(WebUtility.HtmlEncode($"{i + 1}. {image.Name}")).Append("</title></circle>");
            if (labels)
            {
                sb.Append(F($"<text x=\"{positions[i].X:0.#}\" y=\"{positions[i].Y:0.#}\">{i + 1}</text>"));
            }
            sb.Append("</g>");
        }
        sb.Append("</svg>");
        return sb.ToString();
    }

    /// <summary>Wider drawings for larger sets (SVG units; the page scales it to its width).</summary>
    private static double WidthFor(int images) => images <= 100 ? 760 : 1200;

    /// <summary>13 units, or less when placed nodes lie closer: 0.35 of the median distance to the nearest other node, at least 1.5.</summary>
    private static double NodeRadius((double X, double Y)[] positions, IReadOnlyList<ReportImage> images)
    {
        var placed = Enumerable.Range(0, images.Count).Where(i => images[i].ToReference is { Length: 9 }).Select(i => positions[i]).ToList();
        if (placed.Count < 2)
        {
            return 13;
        }
        // Nearest neighbour by a sweep over x (sorted), stopping once the x gap exceeds the best distance.
        var sorted = placed.OrderBy(p => p.X).ThenBy(p => p.Y).ToList();
        var nearest = new double[sorted.Count];
        for (int i = 0; i < sorted.Count; i++)
        {
            double best = double.MaxValue;
            for (int dir = -1; dir <= 1; dir += 2)
            {
                for (int j = i + dir; j >= 0 && j < sorted.Count; j += dir)
                {
                    double dx = sorted[j].X - sorted[i].X;
                    if (dx * dx >= best)
                    {
                        break;
                    }
                    double dy = sorted[j].Y - sorted[i].Y;
                    best = Math.Min(best, dx * dx + dy * dy);
                }
            }
            nearest[i] = Math.Sqrt(best);
        }
        Array.Sort(nearest);
        return Math.Clamp(0.35 * nearest[nearest.Length / 2], 1.5, 13);
    }

    private static (double X, double Y)[] Layout(IReadOnlyList<ReportImage> images, double width, out double height)
    {
        var centres = new (double X, double Y)?[images.Count];
        for (int i = 0; i < images.Count; i++)
        {
            var m = images[i].ToReference;
            if (m is { Length: 9 })
            {
                double x = (images[i].Width - 1) / 2.0, y = (images[i].Height - 1) / 2.0;
                double w = m[6] * x + m[7] * y + m[8];
                double u = (m[0] * x + m[1] * y + m[2]) / w, v = (m[3] * x + m[4] * y + m[5]) / w;
                if (double.IsFinite(u) && double.IsFinite(v))
                {
                    centres[i] = (u, v);
                }
            }
        }
        var placed = centres.Where(c => c is not null).Select(c => c!.Value).ToList();
        var result = new (double X, double Y)[images.Count];
        double inner = width - 2 * Margin;
        double placedHeight;
        if (placed.Count >= 2)
        {
            double minX = placed.Min(c => c.X), maxX = placed.Max(c => c.X), minY = placed.Min(c => c.Y), maxY = placed.Max(c => c.Y);
            double spanX = Math.Max(maxX - minX, 1e-9), spanY = Math.Max(maxY - minY, 1e-9);
            double s = Math.Min(inner / spanX, (images.Count <= 100 ? 360 : 900) / spanY);
            placedHeight = Math.Max(spanY * s, 40) + 2 * Margin;
            double offX = Margin + (inner - spanX * s) / 2;
            for (int i = 0; i < images.Count; i++)
            {
                if (centres[i] is { } c)
                {
                    result[i] = (offX + (c.X - minX) * s, Margin + (c.Y - minY) * s);
                }
            }
        }
        else if (placed.Count == 0 && images.Count > 1)
        {
            // Nothing placed: a ring, in set order.
            double r = 150;
            for (int i = 0; i < images.Count; i++)
            {
                double t = 2 * Math.PI * i / images.Count - Math.PI / 2;
                result[i] = (width / 2 + r * Math.Cos(t), Margin + r + r * Math.Sin(t));
            }
            height = 2 * r + 2 * Margin;
            return result;
        }
        else
        {
            placedHeight = 2 * Margin;
            for (int i = 0; i < images.Count; i++)
            {
                if (centres[i] is not null)
                {
                    result[i] = (width / 2, Margin);
                }
            }
        }
        var unplaced = Enumerable.Range(0, images.Count).Where(i => centres[i] is null).ToList();
        double rowY = placedHeight + 10;
        for (int k = 0; k < unplaced.Count; k++)
        {
            int perRow = (int)(inner / 40);
            result[unplaced[k]] = (Margin + 20 + 40 * (k % perRow), rowY + 40 * (k / perRow));
        }
        height = unplaced.Count == 0 ? placedHeight : rowY + 40 * ((unplaced.Count - 1) / (int)(inner / 40)) + Margin;
        return result;
    }

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
