namespace Seamwright.Pipeline.Planning;

/// <summary>
/// Exact nearest partners by coarse signature for <c>all</c> pairing, below quadratic cost in
/// practice: a vantage-point tree (Yianilos, SODA 1993) over the Euclidean distance of the
/// signatures scaled to unit length, where distance falls as the cosine rises
/// (|a - b|^2 = 2 - 2 cos). Each candidate's score is the same <see cref="PairPlanner.Cosine"/>
/// the full scan uses, and a branch is only skipped when it is farther than the current k-th
/// partner by more than a rounding margin, so the partners (ties by index) equal the full scan's.
/// </summary>
internal sealed class CoarseIndex
{
    private const double Margin = 1e-5;
    private readonly float[][] _unit;
    private readonly int[] _order;
    private readonly double[] _radius;

    /// <summary>Signature comparisons made by the searches so far (the full scan makes n (n - 1)).</summary>
    public long Comparisons { get; private set; }

    public CoarseIndex(IReadOnlyList<float[]> signatures)
    {
        _unit = signatures.Select(Unit).ToArray();
        _order = Enumerable.Range(0, _unit.Length).ToArray();
        _radius = new double[_unit.Length];
        Build(0, _unit.Length);
    }

    /// <summary>Up to <paramref name="k"/> partners of image <paramref name="i"/> with cosine at least <paramref name="minSimilarity"/>, best first, ties by index.</summary>
    public List<int> Best(int i, int k, double minSimilarity, IReadOnlyList<float[]> signatures)
    {
        var best = new List<(double Sim, int J)>(k + 1);
        Search(0, _unit.Length, i, k, minSimilarity, signatures, best);
        return best.Select(b => b.J).ToList();
    }

    private static float[] Unit(float[] v)
    {
        double n = 0;
        foreach (float x in v)
        {
            n += x * (double)x;
        }
        var u = new float[v.Length];
        if (n > 0)
        {
            double s = 1 / Math.Sqrt(n);
            for (int d = 0; d < v.Length; d++)
            {
                u[d] = (float)(v[d] * s);
            }
        }
        return u;
    }

    private double Distance(int a, int b)
    {
        float[] x = _unit[a], y = _unit[b];
        int n = Math.Min(x.Length, y.Length);
        double sum = 0;
        for (int d = 0; d < n; d++)
        {
            double t = x[d] - (double)y[d];
            sum += t * t;
        }
        for (int d = n; d < x.Length; d++)
        {
            sum += x[d] * (double)x[d];
        }
        for (int d = n; d < y.Length; d++)
        {
            sum += y[d] * (double)y[d];
        }
        return Math.Sqrt(sum);
    }

    /// <summary>Node at <c>_order[lo]</c>; inside (distance below its radius) in [lo+1, mid), outside in [mid, hi).</summary>
    private void Build(int lo, int hi)
    {
        if (hi - lo <= 1)
        {
            return;
        }
        int vp = _order[lo];
        var rest = _order[(lo + 1)..hi].Select(j => (D: Distance(vp, j), J: j)).OrderBy(t => t.D).ThenBy(t => t.J).ToArray();
        int half = rest.Length / 2;
        _radius[lo] = rest[half].D;
        for (int t = 0; t < rest.Length; t++)
        {
            _order[lo + 1 + t] = rest[t].J;
        }
        Build(lo + 1, lo + 1 + half);
        Build(lo + 1 + half, hi);
    }

    private void Search(int lo, int hi, int i, int k, double minSim, IReadOnlyList<float[]> signatures, List<(double Sim, int J)> best)
    {
        if (lo >= hi)
        {
            return;
        }
        int vp = _order[lo];
        if (vp != i)
        {
            Comparisons++;
            double sim = PairPlanner.Cosine(signatures[i], signatures[vp]);
            if (sim >= minSim)
            {
                Offer(best, k, sim, vp);
            }
        }
        if (hi - lo == 1)
        {
            return;
        }
        double d = Distance(i, vp);
        int mid = lo + 1 + (hi - lo - 1) / 2;
        bool insideFirst = d < _radius[lo];
        for (int pass = 0; pass < 2; pass++)
        {
            bool inside = insideFirst == (pass == 0);
            double bound = inside ? d - _radius[lo] : _radius[lo] - d; // lower bound of the distance to that half
            if (bound > Tau(minSim) + Margin || (best.Count == k && bound > Tau(best[^1].Sim) + Margin))
            {
                continue;
            }
            if (inside)
            {
                Search(lo + 1, mid, i, k, minSim, signatures, best);
            }
            else
            {
                Search(mid, hi, i, k, minSim, signatures, best);
            }
        }
    }

    /// <summary>The distance of unit vectors with this cosine.</summary>
    private static double Tau(double cosine) => Math.Sqrt(Math.Max(0, 2 - 2 * cosine));

    private static void Offer(List<(double Sim, int J)> best, int k, double sim, int j)
    {
        int at = best.FindIndex(b => sim > b.Sim || (sim == b.Sim && j < b.J));
        if (at < 0)
        {
            if (best.Count < k)
            {
                best.Add((sim, j));
            }
            return;
        }
        best.Insert(at, (sim, j));
        if (best.Count > k)
        {
            best.RemoveAt(best.Count - 1);
        }
    }
}
