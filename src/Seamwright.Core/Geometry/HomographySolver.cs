using MathNet.Numerics.LinearAlgebra;

namespace Seamwright.Core.Geometry;

/// <summary>
/// Direct linear transform (DLT) for plane homographies (Hartley and Zisserman, Multiple View
/// Geometry, 2nd ed., Algorithm 4.2), always on Hartley-normalised coordinates.
/// </summary>
public static class HomographySolver
{
    public const int MinimalSampleSize = 4;

    /// <summary>
    /// Exact homography through four matches. In normalised coordinates the centroid of the sample
    /// sits at the origin, so h33 (the image of the origin's w) cannot vanish for any usable
    /// model; fixing h33 = 1 leaves an 8 x 8 system solved by elimination (no allocation).
    /// </summary>
    public static bool TryMinimal(ReadOnlySpan<Correspondence> sample, out Transform2D model)
    {
        model = default;
        if (sample.Length != MinimalSampleSize)
        {
            return false;
        }
        var (n1, n2) = HartleyNormalization.ForMatches(sample);
        Span<double> a = stackalloc double[64];
        Span<double> b = stackalloc double[8];
        for (int i = 0; i < 4; i++)
        {
            var (x, y) = n1.Apply(sample[i].X1, sample[i].Y1);
            var (u, v) = n2.Apply(sample[i].X2, sample[i].Y2);
            int r = 2 * i * 8;
            a[r + 0] = x; a[r + 1] = y; a[r + 2] = 1; a[r + 3] = 0; a[r + 4] = 0; a[r + 5] = 0; a[r + 6] = -u * x; a[r + 7] = -u * y;
            b[2 * i] = u;
            r += 8;
            a[r + 0] = 0; a[r + 1] = 0; a[r + 2] = 0; a[r + 3] = x; a[r + 4] = y; a[r + 5] = 1; a[r + 6] = -v * x; a[r + 7] = -v * y;
            b[2 * i + 1] = v;
        }
        if (!SmallLinearSolve.TrySolve(a, b, 8))
        {
            return false;
        }
        var hn = new Transform2D(b[0], b[1], b[2], b[3], b[4], b[5], b[6], b[7], 1);
        return Denormalise(hn, n1, n2, out model);
    }

    /// <summary>
    /// Normalised DLT over any number (at least four) of matches: the right singular vector of the
    /// smallest singular value of the 9 x 9 normal matrix (MathNet SVD), then denormalised.
    /// </summary>
    public static bool TryLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model)
    {
        model = default;
        if (data.Length < MinimalSampleSize)
        {
            return false;
        }
        var (n1, n2) = HartleyNormalization.ForMatches(data);
        var ata = new double[81];
        Span<double> row = stackalloc double[9];
        foreach (var m in data)
        {
            var (x, y) = n1.Apply(m.X1, m.Y1);
            var (u, v) = n2.Apply(m.X2, m.Y2);
            row[0] = x; row[1] = y; row[2] = 1; row[3] = 0; row[4] = 0; row[5] = 0; row[6] = -u * x; row[7] = -u * y; row[8] = -u;
            Accumulate(ata, row);
            row[0] = 0; row[1] = 0; row[2] = 0; row[3] = x; row[4] = y; row[5] = 1; row[6] = -v * x; row[7] = -v * y; row[8] = -v;
            Accumulate(ata, row);
        }
        for (int i = 0; i < 9; i++)
        {
            for (int j = 0; j < i; j++)
            {
                ata[i * 9 + j] = ata[j * 9 + i];
            }
        }
        if (!ata.All(double.IsFinite))
        {
            return false;
        }
        var svd = Matrix<double>.Build.DenseOfRowMajor(9, 9, ata).Svd(computeVectors: true);
        var h = svd.VT.Row(8);
        var hn = new Transform2D(h[0], h[1], h[2], h[3], h[4], h[5], h[6], h[7], h[8]);
        return Denormalise(hn, n1, n2, out model);
    }

    private static void Accumulate(double[] ata, ReadOnlySpan<double> row)
    {
        for (int i = 0; i < 9; i++)
        {
            double ri = row[i];
            if (ri == 0)
            {
                continue;
            }
            for (int j = i; j < 9; j++)
            {
                ata[i * 9 + j] += ri * row[j];
            }
        }
    }

    private static bool Denormalise(in Transform2D normalised, in HartleyNormalization n1, in HartleyNormalization n2, out Transform2D model)
    {
        var h = n2.InverseMatrix * normalised * n1.Matrix;
        if (!h.IsFinite || Math.Abs(h.M33) < 1e-300)
        {
            model = default;
            return false;
        }
        model = h.Normalized();
        return model.IsFinite;
    }
}
