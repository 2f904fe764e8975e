using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Tests.Estimation;

/// <summary>
/// Small synthetic match sets built to be hard for sampling: noisy inliers of one model (so
/// minimal samples give poor models), a second structured group of outliers that agree with a
/// nearby model (a few thresholds away), and scattered gross outliers.
/// </summary>
internal static class HardConsensusProblems
{
    public const double Width = 640, Height = 480;

    /// <summary>A model of the family, mildly rotated, scaled and (homography) tilted, drawn from the seed.</summary>
    public static Transform2D TrueModel(MotionModel model, TestRandom rng)
    {
        double angle = (rng.NextDouble() - 0.5) * 0.3;
        double scale = model == MotionModel.Translation ? 1 : 0.9 + 0.2 * rng.NextDouble();
        if (model == MotionModel.Translation)
        {
            angle = 0;
        }
        double tx = 40 + 60 * rng.NextDouble(), ty = -20 + 40 * rng.NextDouble();
        double c = scale * Math.Cos(angle), s = scale * Math.Sin(angle);
        var h = new Transform2D(c, -s, tx, s, c, ty, 0, 0, 1);
        if (model == MotionModel.Affine)
        {
            h = h with { M12 = h.M12 + 0.05 * (rng.NextDouble() - 0.5), M21 = h.M21 + 0.05 * (rng.NextDouble() - 0.5) };
        }
        if (model == MotionModel.Homography)
        {
            h = h with { M31 = 2e-4 * (rng.NextDouble() - 0.5), M32 = 2e-4 * (rng.NextDouble() - 0.5) };
        }
        return h;
    }

    /// <summary>
    /// <paramref name="inliers"/> noisy matches of a true model, <paramref name="decoys"/> matches of a
    /// second model shifted by <paramref name="decoyShift"/> pixels, and <paramref name="gross"/> random ones.
    /// </summary>
    public static Correspondence[] Generate(MotionModel model, ulong seed, int inliers, int decoys, int gross, double noise, double decoyShift)
    {
        var rng = new TestRandom(seed);
        var truth = TrueModel(model, rng);
        double a = rng.NextDouble() * 2 * Math.PI;
        var decoy = Transform2D.Translation(decoyShift * Math.Cos(a), decoyShift * Math.Sin(a)) * truth;
        var list = new List<Correspondence>();
        Add(list, rng, truth, inliers, noise);
        Add(list, rng, decoy, decoys, noise);
        for (int i = 0; i < gross; i++)
        {
            list.Add(new(rng.NextDouble() * Width, rng.NextDouble() * Height, rng.NextDouble() * Width, rng.NextDouble() * Height));
        }
        // A seeded shuffle so the groups are not in order.
        for (int i = list.Count - 1; i > 0; i--)
        {
            int j = (int)(rng.Next() % (ulong)(i + 1));
            (list[i], list[j]) = (list[j], list[i]);
        }
        return [.. list];
    }

    private static void Add(List<Correspondence> list, TestRandom rng, Transform2D h, int count, double noise)
    {
        for (int i = 0; i < count; i++)
        {
            double x = rng.NextDouble() * Width, y = rng.NextDouble() * Height;
            var (u, v) = h.Apply(x, y);
            list.Add(new(x, y, u + noise * rng.NextGaussian(), v + noise * rng.NextGaussian()));
        }
    }
}
