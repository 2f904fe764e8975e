namespace Seamwright.Core.Alignment;

/// <summary>
/// A symmetric positive definite matrix stored by its lower envelope (per row, the columns from
/// the first non-zero to the diagonal), factorised in place by Cholesky. Fill-in stays inside the
/// envelope (George and Liu, "Computer Solution of Large Sparse Positive Definite Systems", 1981),
/// so with a bandwidth-reducing order of the images (reverse Cuthill-McKee) the normal equations
/// of a set cost far less than a dense solve.
/// </summary>
internal sealed class EnvelopeCholesky
{
    private readonly int[] _first;
    private readonly double[][] _rows;

    /// <param name="firstColumn">For each row, the first column that may be non-zero (at most the row index).</param>
    public EnvelopeCholesky(int[] firstColumn)
    {
        _first = firstColumn;
        _rows = new double[firstColumn.Length][];
        for (int i = 0; i < firstColumn.Length; i++)
        {
            if (firstColumn[i] < 0 || firstColumn[i] > i)
            {
                throw new ArgumentException("First column must lie in [0, row].", nameof(firstColumn));
            }
            _rows[i] = new double[i - firstColumn[i] + 1];
        }
    }

    public int Size => _first.Length;

    /// <summary>Stored entries (the work a factorisation touches is bounded by their squares per row).</summary>
    public long StoredEntries => _rows.Sum(r => (long)r.Length);

    public void Clear()
    {
        foreach (var r in _rows)
        {
            Array.Clear(r);
        }
    }

    /// <summary>Adds to entry (i, j) with j &lt;= i.</summary>
    public void Add(int i, int j, double value) => _rows[i][j - _first[i]] += value;

    public double Diagonal(int i) => _rows[i][^1];

    public void SetDiagonal(int i, double value) => _rows[i][^1] = value;

    /// <summary>Copies the values of another matrix with the same envelope.</summary>
    public void CopyFrom(EnvelopeCholesky other)
    {
        for (int i = 0; i < _rows.Length; i++)
        {
            Array.Copy(other._rows[i], _rows[i], _rows[i].Length);
        }
    }

    /// <summary>Factorises in place (A = L L^T); false when the matrix is not positive definite.</summary>
    public bool Factorize()
    {
        for (int i = 0; i < _rows.Length; i++)
        {
            var ri = _rows[i];
            int fi = _first[i];
            for (int j = fi; j <= i; j++)
            {
                var rj = _rows[j];
                int fj = _first[j];
                int from = Math.Max(fi, fj);
                double sum = ri[j - fi] - Dot(ri.AsSpan(from - fi, j - from), rj.AsSpan(from - fj, j - from));
                if (j < i)
                {
                    ri[j - fi] = sum / rj[^1];
                }
                else
                {
                    if (!(sum > 0) || !double.IsFinite(sum))
                    {
                        return false;
                    }
                    ri[j - fi] = Math.Sqrt(sum);
                }
            }
        }
        return true;
    }

    /// <summary>
    /// Dot product in four interleaved partial sums, ((s0 + s1) + (s2 + s3)) then the tail: four
    /// independent chains instead of one, the same bits on every machine (no vector width or
    /// fused multiply-add involved).
    /// </summary>
    internal static double Dot(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        double s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        int n = a.Length, k = 0;
        b = b[..n];
        for (; k + 4 <= n; k += 4)
        {
            s0 += a[k] * b[k];
            s1 += a[k + 1] * b[k + 1];
            s2 += a[k + 2] * b[k + 2];
            s3 += a[k + 3] * b[k + 3];
        }
        double s = (s0 + s1) + (s2 + s3);
        for (; k < n; k++)
        {
            s += a[k] * b[k];
        }
        return s;
    }

    /// <summary>Solves L L^T x = b after <see cref="Factorize"/>; b is overwritten by x.</summary>
    public void Solve(Span<double> b)
    {
        int n = _rows.Length;
        for (int i = 0; i < n; i++)
        {
            var ri = _rows[i];
            int fi = _first[i];
            double sum = b[i];
            for (int m = fi; m < i; m++)
            {
                sum -= ri[m - fi] * b[m];
            }
            b[i] = sum / ri[^1];
        }
        for (int i = n - 1; i >= 0; i--)
        {
            var ri = _rows[i];
            int fi = _first[i];
            b[i] /= ri[^1];
            double xi = b[i];
            for (int m = fi; m < i; m++)
            {
                b[m] -= ri[m - fi] * xi;
            }
        }
    }
}
