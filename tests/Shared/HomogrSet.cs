using System.Globalization;
using Seamwright.Core.Geometry;

namespace Seamwright.Tests.Shared;

/// <summary>
/// Reader for the homogr evaluation set (Lebeda, Matas, Chum, "Fixing the Locally Optimized
/// RANSAC", BMVC 2012). Label-0 rows are tentative matches; label-1 rows are hand-annotated
/// validation pairs that must never reach an estimator. The model file maps B to A.
/// </summary>
internal sealed record HomogrPair(string Name, string ImageA, string ImageB, Correspondence[] Tentative, Correspondence[] Validation, Transform2D ModelBToA)
{
    /// <summary>Mean forward transfer error (px of B) of an A-to-B transform over the validation pairs.</summary>
    public double ValidationError(Transform2D aToB)
    {
        double sum = 0;
        foreach (var v in Validation)
        {
            var (u, w) = aToB.Apply(v.X1, v.Y1);
            double d = Math.Sqrt((u - v.X2) * (u - v.X2) + (w - v.Y2) * (w - v.Y2));
            sum += double.IsFinite(d) ? d : 1e9;
        }
        return sum / Validation.Length;
    }
}

internal static class HomogrSet
{
    public const string Source = "homogr set, Lebeda, Matas, Chum, BMVC 2012 (../shared/data/homogr)";

    /// <summary>All 16 pairs, sorted by name; null when the folder is absent (caller decides skip or fail).</summary>
    public static IReadOnlyList<HomogrPair>? TryLoad()
    {
        string folder = RepoPaths.HomogrFolder;
        if (!Directory.Exists(folder))
        {
            return null;
        }
        var pairs = new List<HomogrPair>();
        foreach (string pts in Directory.GetFiles(folder, "*_pts.txt").Order(StringComparer.Ordinal))
        {
            string name = Path.GetFileName(pts)[..^"_pts.txt".Length];
            var tentative = new List<Correspondence>();
            var validation = new List<Correspondence>();
            foreach (string line in File.ReadLines(pts))
            {
                var f = line.Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries);
                if (f.Length < 7)
                {
                    continue;
                }
                var c = new Correspondence(P(f[0]), P(f[1]), P(f[3]), P(f[4]));
                (P(f[6]) == 1 ? validation : tentative).Add(c);
            }
            var model = File.ReadAllText(Path.Combine(folder, name + "_model.txt"))
                .Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries).Select(P).ToArray();
            pairs.Add(new HomogrPair(name, FindImage(folder, name + "A"), FindImage(folder, name + "B"),
                [.. tentative], [.. validation], Transform2D.FromRowMajor(model)));
        }
        return pairs;
    }

    private static string FindImage(string folder, string stem)
    {
        foreach (string ext in new[] { ".png", ".jpg" })
        {
            string p = Path.Combine(folder, stem + ext);
            if (File.Exists(p))
            {
                return p;
            }
        }
        return Path.Combine(folder, stem + ".png");
    }

    private static double P(string s) => double.Parse(s, NumberStyles.Float, CultureInfo.InvariantCulture);
}
