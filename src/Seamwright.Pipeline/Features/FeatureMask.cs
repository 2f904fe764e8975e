using System.Globalization;
using Seamwright.Core.Imaging;

namespace Seamwright.Pipeline.Features;

/// <summary>A rectangle in full-resolution pixels of the image as displayed (X, Y of the top-left pixel).</summary>
public readonly record struct MaskRectangle(int X, int Y, int Width, int Height);

/// <summary>
/// Regions excluded from corner detection (rulers, colour targets, scanner-bed edges, burnt-in
/// timestamps): rectangles, and/or a mask image stretched over the whole image in which dark
/// pixels (below 128) are excluded.
/// </summary>
public sealed record FeatureMask(IReadOnlyList<MaskRectangle> ExcludedRectangles, GrayImage? Image = null)
{
    public static FeatureMask None { get; } = new([]);

    public bool IsEmpty => ExcludedRectangles.Count == 0 && Image is null;

    /// <summary>Parses rectangles, one per line as "x y width height" (blank lines and # comments ignored).</summary>
    public static FeatureMask ParseRectangles(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var list = new List<MaskRectangle>();
        int lineNumber = 0;
        foreach (string raw in text.Split('\n'))
        {
            lineNumber++;
            string line = raw.Trim();
            if (line.Length == 0 || line.StartsWith('#'))
            {
                continue;
            }
            var f = line.Split([' ', '\t', ','], StringSplitOptions.RemoveEmptyEntries);
            if (f.Length != 4 || !f.All(s => int.TryParse(s, NumberStyles.Integer, CultureInfo.InvariantCulture, out _)))
            {
                throw new FormatException($"line {lineNumber}: expected 'x y width height', got '{line}'");
            }
            var v = f.Select(s => int.Parse(s, CultureInfo.InvariantCulture)).ToArray();
            if (v[2] <= 0 || v[3] <= 0)
            {
                throw new FormatException($"line {lineNumber}: width and height must be positive");
            }
            list.Add(new MaskRectangle(v[0], v[1], v[2], v[3]));
        }
        return new FeatureMask(list);
    }

    /// <summary>The mask rasterised at a working size (255 = use, 0 = excluded); null when nothing is excluded.</summary>
    public GrayImage? Rasterize(int fullWidth, int fullHeight, int width, int height)
    {
        if (IsEmpty)
        {
            return null;
        }
        var m = new GrayImage(width, height);
        Array.Fill(m.Pixels, (byte)255);
        double sx = (double)width / fullWidth, sy = (double)height / fullHeight;
        foreach (var r in ExcludedRectangles)
        {
            int x0 = Math.Max(0, (int)Math.Floor(r.X * sx)), y0 = Math.Max(0, (int)Math.Floor(r.Y * sy));
            int x1 = Math.Min(width, (int)Math.Ceiling((r.X + r.Width) * sx)), y1 = Math.Min(height, (int)Math.Ceiling((r.Y + r.Height) * sy));
            for (int y = y0; y < y1; y++)
            {
                m.Row(y)[x0..Math.Max(x0, x1)].Clear();
            }
        }
        if (Image is { } img)
        {
            for (int y = 0; y < height; y++)
            {
                int iy = Math.Min(img.Height - 1, (int)((y + 0.5) * img.Height / height));
                for (int x = 0; x < width; x++)
                {
                    int ix = Math.Min(img.Width - 1, (int)((x + 0.5) * img.Width / width));
                    if (img[ix, iy] < 128)
                    {
                        m[x, y] = 0;
                    }
                }
            }
        }
        return m;
    }
}
