using System.Globalization;
using System.Net;
using System.Text;

namespace Seamwright.Pipeline.Report;

/// <summary>
/// The pair graph as inline SVG: one node per image at its centre in the reference frame (unplaced
/// images in a row below), one edge per pair coloured by status.
/// </summary>
internal static class PairGraphSvg
{
    private const double Width = 760, Margin = 36;

    public static string Render(SetReport report)
    {
        var index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (int i = 0; i < report.Images.Count; i++)
        {
            index.TryAdd(report.Images[i].Name, i);
        }
        var positions = Layout(report.Images, out double height);
        var sb = new StringBuilder();
        sb.Append(F($"<svg class=\"graph\" viewBox=\"0 0 {Width:0} {height:0}\" role=\"img\" aria-label=\"pair graph\">"));
        for (int p = 0; p < report.Pairs.Count; p++)
        {
            var pair = report.Pairs[p];
            if (!index.TryGetValue(pair.ImageA, out int a) || !index.TryGetValue(pair.ImageB, out int b))
            {
                continue;
            }
            var (colour, dash) = pair.AlignmentNote is not null ? ("var(--out)", "2 6")
                : pair.Status switch
                {
                    "accepted" => ("var(--ok)", ""),
                    "weak" => ("var(--weak)", "8 4"),
                    _ => ("var(--bad)", "3 5"),
                };
            sb.Append(F($"<line id=\"edge-{p}\" x1=\"{positions[a].X:0.#}\" y1=\"{positions[a].Y:0.#}\" x2=\"{positions[b].X:0.#}\" y2=\"{positions[b].Y:0.#}\" style=\"stroke:{colour}\""));
            if (dash.Length > 0)
            {
                sb.Append(F($" stroke-dasharray=\"{dash}\""));
            }
            sb.Append("><title>").Append(WebUtility.HtmlEncode($"{pair.ImageA} - {pair.ImageB}: {pair.Status}")).Append("</title></line>");
        }
        for (int i = 0; i < report.Images.Count; i++)
        {
            var image = report.Images[i];
            string cls = image.IsReference ? "ref" : image.ToReference is null ? "unplaced" : "";
            sb.Append(F($"<g><circle r=\"13\" cx=\"{positions[i].X:0.#}\" cy=\"{positions[i].Y:0.#}\" class=\"{cls}\"><title>"));
            sb.Append(WebUtility.HtmlEncode(image.Name)).Append("</title></circle>");
            sb.Append(F($"<text x=\"{positions[i].X:0.#}\" y=\"{positions[i].Y:0.#}\">{i + 1}</text></g>"));
        }
        sb.Append("</svg>");
        return sb.ToString();
    }

    private static (double X, double Y)[] Layout(IReadOnlyList<ReportImage> images, out double height)
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
        double inner = Width - 2 * Margin;
        double placedHeight;
        if (placed.Count >= 2)
        {
            double minX = placed.Min(c => c.X), maxX = placed.Max(c => c.X), minY = placed.Min(c => c.Y), maxY = placed.Max(c => c.Y);
            double spanX = Math.Max(maxX - minX, 1e-9), spanY = Math.Max(maxY - minY, 1e-9);
            double s = Math.Min(inner / spanX, 360 / spanY);
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
                result[i] = (Width / 2 + r * Math.Cos(t), Margin + r + r * Math.Sin(t));
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
                    result[i] = (Width / 2, Margin);
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
