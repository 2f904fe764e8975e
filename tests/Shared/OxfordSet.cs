using System.Globalization;
using Seamwright.Core.Geometry;

namespace Seamwright.Tests.Shared;

/// <summary>One Oxford pair: img1 of a sequence to imgK, with the published homography.</summary>
internal sealed record OxfordPair(string Name, string ImageA, string ImageB, Transform2D Truth)
{
    /// <summary>
    /// The set README's score: a 10 x 10 grid of points of img1 that land inside imgK by both the
    /// truth and the estimate; the mean distance in pixels of imgK (infinite when none qualifies).
    /// </summary>
    public double GridError(Transform2D estimate, int widthA, int heightA, int widthB, int heightB)
    {
        double sum = 0;
        int n = 0;
        for (int gy = 0; gy < 10; gy++)
        {
            for (int gx = 0; gx < 10; gx++)
            {
                double x = gx * (widthA - 1) / 9.0, y = gy * (heightA - 1) / 9.0;
                if (!Truth.TryApply(x, y, out double tu, out double tv) || !estimate.TryApply(x, y, out double eu, out double ev)
                    || !Inside(tu, tv, widthB, heightB) || !Inside(eu, ev, widthB, heightB))
                {
                    continue;
                }
                sum += Math.Sqrt((tu - eu) * (tu - eu) + (tv - ev) * (tv - ev));
                n++;
            }
        }
        return n > 0 ? sum / n : double.PositiveInfinity;
    }

    private static bool Inside(double x, double y, int w, int h) => x >= 0 && y >= 0 && x <= w - 1 && y <= h - 1;
}

/// <summary>
/// Reader for the Oxford affine-covariant-regions sequences (Mikolajczyk et al., "A Comparison of
/// Affine Region Detectors", IJCV 2005), kept outside the repository in ../shared/data/oxford.
/// </summary>
internal static class OxfordSet
{
    public const string Source = "Oxford sequences, Mikolajczyk et al., IJCV 2005 (../shared/data/oxford)";

    public static string Folder => Path.GetFullPath(Path.Combine(RepoPaths.Root, "..", "shared", "data", "oxford"));

    /// <summary>All 40 pairs (img1 to img2..img6 of each sequence, sequences by name); null when the folder is absent.</summary>
    public static IReadOnlyList<OxfordPair>? TryLoad()
    {
        if (!Directory.Exists(Folder))
        {
            return null;
        }
        var pairs = new List<OxfordPair>();
        foreach (string seq in Directory.GetDirectories(Folder).Order(StringComparer.Ordinal))
        {
            for (int k = 2; k <= 6; k++)
            {
                string h = Path.Combine(seq, "H1to" + k.ToString(CultureInfo.InvariantCulture) + "p");
                if (!File.Exists(h))
                {
                    continue;
                }
                var m = File.ReadAllText(h).Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries)
                    .Select(s => double.Parse(s, CultureInfo.InvariantCulture)).ToArray();
                pairs.Add(new OxfordPair($"{Path.GetFileName(seq)} 1-{k}", Path.Combine(seq, "img1.png"),
                    Path.Combine(seq, $"img{k}.png"), Transform2D.FromRowMajor(m)));
            }
        }
        return pairs;
    }
}
