using MathNet.Numerics.LinearAlgebra;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Tests.Estimation;

/// <summary>
/// Test helper until the project's sampler lands on main: plain RANSAC (Fischler and Bolles 1981)
/// with minimal solvers (4-point DLT for the homography, Hartley-normalised) and the standard
/// confidence bound. No local optimisation, so it leaves room for the refinement to show.
/// </summary>
internal static class PlainRansac
{
    public static int SampleSize(MotionModel model) => model switch
    {
        MotionModel.Homography => 4,
        MotionModel.Affine => 3,
        MotionModel.Similarity => 2,
        _ => 1,
    };

    /// <summary>Best model by forward-transfer consensus; <paramref name="maxIterations"/> caps the samples drawn.</summary>
    public static (Transform2D Model, int Consensus, int Iterations) Estimate(
        ReadOnlySpan<Correspondence> matches, MotionModel model, double threshold, ulong seed, int maxIterations, double confidence = 0.99)
    {
        int s = SampleSize(model);
        var rng = new TestRandom(seed);
        var (n1, n2) = HartleyNormalization.ForMatches(matches);
        var best = Transform2D.Identity;
        int bestCount = -1;
        int n = matches.Length;
        var sample = new int[s];
        long bound = maxIterations;
        int it = 0;
        for (; it < Math.Min(bound, maxIterations); it++)
        {
            for (int a = 0; a < s; a++)
            {
                int pick;
                do
                {
                    pick = (int)(rng.Next() % (ulong)n);
                }
                while (Array.IndexOf(sample, pick, 0, a) >= 0);
                sample[a] = pick;
            }
            if (!TryMinimal(matches, sample, model, n1, n2, out var h))
            {
                continue;
            }
            int c = Count(matches, h, threshold);
            if (c > bestCount)
            {
                bestCount = c;
                best = h;
                double inlierRatio = (double)c / n;
                double pGood = Math.Pow(inlierRatio, s);
                bound = pGood >= 1 ? 1 : pGood <= 0 ? maxIterations
                    : (long)Math.Min(maxIterations, Math.Ceiling(Math.Log(1 - confidence) / Math.Log(1 - pGood)));
            }
        }
        return (best, Math.Max(bestCount, 0), it);
    }

    public static int Count(ReadOnlySpan<Correspondence> matches, Transform2D h, double threshold)
    {
        int c = 0;
        foreach (var m in matches)
        {
            if (h.W(m.X1, m.Y1) > 0 && h.TryApply(m.X1, m.Y1, out double u, out double v)
                && (u - m.X2) * (u - m.X2) + (v - m.Y2) * (v - m.Y2) <= threshold * threshold)
            {
                c++;
            }
        }
        return c;
    }

    private static bool TryMinimal(ReadOnlySpan<Correspondence> matches, int[] sample, MotionModel model,
        HartleyNormalization n1, HartleyNormalization n2, out Transform2D h)
    {
        int p = model switch { MotionModel.Homography => 8, MotionModel.Affine => 6, MotionModel.Similarity => 4, _ => 2 };
        var a = Matrix<double>.Build.Dense(p, p);
        var b = Vector<double>.Build.Dense(p);
        for (int r = 0; r < sample.Length; r++)
        {
            var m = matches[sample[r]];
            var (x, y) = n1.Apply(m.X1, m.Y1);
            var (xp, yp) = n2.Apply(m.X2, m.Y2);
            int i = 2 * r;
            switch (model)
            {
                case MotionModel.Homography:
                    a[i, 0] = x; a[i, 1] = y; a[i, 2] = 1; a[i, 6] = -x * xp; a[i, 7] = -y * xp; b[i] = xp;
                    a[i + 1, 3] = x; a[i + 1, 4] = y; a[i + 1, 5] = 1; a[i + 1, 6] = -x * yp; a[i + 1, 7] = -y * yp; b[i + 1] = yp;
                    break;
                case MotionModel.Affine:
                    a[i, 0] = x; a[i, 1] = y; a[i, 2] = 1; b[i] = xp;
                    a[i + 1, 3] = x; a[i + 1, 4] = y; a[i + 1, 5] = 1; b[i + 1] = yp;
                    break;
                case MotionModel.Similarity:
                    a[i, 0] = x; a[i, 1] = -y; a[i, 2] = 1; b[i] = xp;
                    a[i + 1, 0] = y; a[i + 1, 1] = x; a[i + 1, 3] = 1; b[i + 1] = yp;
                    break;
                default:
                    // Pixel translation: solved directly below.
                    break;
            }
        }
        if (model == MotionModel.Translation)
        {
            var m = matches[sample[0]];
            h = Transform2D.Translation(m.X2 - m.X1, m.Y2 - m.Y1);
            return true;
        }
        h = default;
        if (Math.Abs(a.Determinant()) < 1e-12)
        {
            return false;
        }
        var t = a.Solve(b);
        Transform2D hn = model switch
        {
            MotionModel.Homography => new(t[0], t[1], t[2], t[3], t[4], t[5], t[6], t[7], 1),
            MotionModel.Affine => new(t[0], t[1], t[2], t[3], t[4], t[5], 0, 0, 1),
            _ => new(t[0], -t[1], t[2], t[1], t[0], t[3], 0, 0, 1),
        };
        h = n2.InverseMatrix * hn * n1.Matrix;
        if (model == MotionModel.Homography)
        {
            double m33 = Math.Abs(h.M33);
            if (!(m33 > 1e-300))
            {
                return false;
            }
            h = h.Scale(1 / m33);
        }
        else
        {
            h = h with { M31 = 0, M32 = 0, M33 = 1 };
        }
        return h.IsFinite;
    }
}

/// <summary>splitmix64 (Steele, Lea, Flood, OOPSLA 2014): a tiny seeded generator for tests, never System.Random.</summary>
internal sealed class TestRandom(ulong seed)
{
    private ulong _state = seed;

    public ulong Next()
    {
        ulong z = _state += 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }

    /// <summary>Uniform in [0, 1).</summary>
    public double NextDouble() => (Next() >> 11) * (1.0 / (1UL << 53));

    /// <summary>Standard normal by Box-Muller.</summary>
    public double NextGaussian()
    {
        double u1 = 1 - NextDouble(), u2 = NextDouble();
        return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
