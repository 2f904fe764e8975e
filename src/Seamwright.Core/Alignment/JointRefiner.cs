using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>Outcome of one joint refinement.</summary>
/// <param name="ToReference">Per image, the transform into the reference.</param>
/// <param name="Iterations">Levenberg-Marquardt iterations accepted, over both passes.</param>
/// <param name="InitialCost">Robust cost of the start under the first pass's loss.</param>
/// <param name="FinalCost">Robust cost of the result under the last pass's loss.</param>
/// <param name="RobustScalePx">Scale of the Cauchy loss of the last pass, px.</param>
internal sealed record JointSolution(Dictionary<int, Transform2D> ToReference, int Iterations, double InitialCost, double FinalCost, double RobustScalePx);

/// <summary>
/// Joint refinement of the transforms of one component over all tie points of its links
/// (bundle adjustment of plane transforms; Levenberg-Marquardt as in Marquardt, SIAM J. Appl.
/// Math. 1963, with a Cauchy loss by iteratively reweighted normal equations). The reference is
/// fixed. Each tie point gives two residuals, each measured in the pixels of the image where it
/// was observed: the point of A carried through the reference into B, against the point of B, and
/// the other way round; so shrinking an image cannot lower its residuals. The normal equations are
/// assembled block by block from the links (never a dense Jacobian) and solved with an envelope
/// Cholesky under a reverse Cuthill-McKee order of the images.
/// <para>
/// Two passes when the scale adapts: the first with the configured scale (an upper bound, wide
/// enough that links the spanning tree left misaligned still pull), the second with the scale
/// matched to the tie points' own noise, measured under the first pass's solution: sigma per
/// coordinate = median residual distance / 1.1774 (the median of a Rayleigh distribution is
/// sigma sqrt(2 ln 2)), scale = 4 sigma. The Cauchy constant of 95 % efficiency, 2.3849 sigma
/// (Holland and Welsch, Commun. Statist. 1977), is for one-dimensional residuals; applied to the
/// length of a two-dimensional one it keeps 94 %, and 4 sigma keeps 98.5 % (asymptotic variance
/// of the M-estimator with the radial Cauchy weight under Gaussian noise, computed) while a point
/// 20 sigma off still weighs 4 %. Matched tie points are accurate to
/// a few hundredths of a pixel; a loss whose quadratic part reaches 2 px lets the few points off
/// by a pixel or more (a re-localisation on a repeated texture, a point just inside the pair's
/// inlier threshold) carry most of the weight, and along a chain of similarities that error
/// walks into the far frames.
/// </para>
/// </summary>
internal sealed class JointRefiner
{
    /// <summary>Damping d (1 + lambda): lambda from 1e-4, divided by 3 on a gain, times 4 on a loss, times 10 when not positive definite; 12 tries.</summary>
    private static readonly DampingSchedule Schedule = new(
        InitialLambda: 1e-4, Decrease: 3, IncreaseOnReject: 4, IncreaseOnSingular: 10,
        MaxAttempts: 12, MaxLambda: double.PositiveInfinity, RelativeGainTolerance: 1e-12);

    private readonly MotionModel _model;
    private readonly int _k;
    private readonly double _scale;
    private readonly double _robustMax;
    private readonly double _robustMin;
    private double _robust;
    private readonly int _reference;
    private readonly int[] _vars;
    private readonly Dictionary<int, int> _position = [];
    private readonly Dictionary<int, (double X, double Y)> _centre = [];
    private readonly List<LinkData> _links = [];

    private sealed record LinkData(int A, int B, double[] Ax, double[] Ay, double[] Bx, double[] By);

    public JointRefiner(MotionModel model, IReadOnlyList<ImageSize> sizes, int reference, IReadOnlyList<int> images,
        IReadOnlyList<(int A, int B, Correspondence[] Ties)> links, double robustScalePx, double minRobustScalePx)
    {
        _model = model;
        _k = ModelParameters.Count(model);
        _reference = reference;
        double meanHalfDiagonal = images.Average(i => 0.5 * Math.Sqrt((double)sizes[i].Width * sizes[i].Width + (double)sizes[i].Height * sizes[i].Height));
        _scale = 1 / Math.Max(1, meanHalfDiagonal);
        _robustMax = robustScalePx * _scale;
        _robustMin = Math.Min(minRobustScalePx, robustScalePx) * _scale;
        _robust = _robustMax;
        foreach (int i in images)
        {
            _centre[i] = ((sizes[i].Width - 1) / 2.0, (sizes[i].Height - 1) / 2.0);
        }
        foreach (var (a, b, ties) in links)
        {
            var (ca, cb) = (_centre[a], _centre[b]);
            _links.Add(new LinkData(a, b,
                [.. ties.Select(t => _scale * (t.X1 - ca.X))], [.. ties.Select(t => _scale * (t.Y1 - ca.Y))],
                [.. ties.Select(t => _scale * (t.X2 - cb.X))], [.. ties.Select(t => _scale * (t.Y2 - cb.Y))]));
        }
        _vars = ReverseCuthillMcKee(images.Where(i => i != reference).ToArray());
        for (int p = 0; p < _vars.Length; p++)
        {
            _position[_vars[p]] = p;
        }
    }

    /// <summary>Refines from <paramref name="initial"/>; with <paramref name="adaptScale"/> a second pass at the scale matched to the tie points' noise.</summary>
    public JointSolution Solve(IReadOnlyDictionary<int, Transform2D> initial, int maxIterations, bool adaptScale)
    {
        _robust = _robustMax;
        var first = Pass(initial, maxIterations);
        if (!adaptScale || _robustMin >= _robustMax)
        {
            return first;
        }
        double matched = Math.Clamp(MatchedScale(first.ToReference), _robustMin, _robustMax);
        if (!(matched < _robustMax))
        {
            return first;
        }
        _robust = matched;
        var second = Pass(first.ToReference, maxIterations);
        return second with { Iterations = first.Iterations + second.Iterations, InitialCost = first.InitialCost };
    }

    /// <summary>4 sigma, sigma from the median residual distance (normalised units); infinity without tie points.</summary>
    private double MatchedScale(IReadOnlyDictionary<int, Transform2D> solution)
    {
        var theta = new double[_vars.Length * _k];
        for (int p = 0; p < _vars.Length; p++)
        {
            ModelParameters.FromTransform(_model, ToNormalized(_vars[p], solution[_vars[p]]), theta.AsSpan(p * _k, _k));
        }
        if (Current(theta) is not { } current)
        {
            return double.PositiveInfinity;
        }
        var (f, inv) = current;
        var distances = new List<double>();
        foreach (var link in _links)
        {
            int a = Slot(link.A), b = Slot(link.B);
            for (int t = 0; t < link.Ax.Length; t++)
            {
                distances.Add(Math.Sqrt(Transfer(f[a], inv[b], link.Ax[t], link.Ay[t], link.Bx[t], link.By[t])));
                distances.Add(Math.Sqrt(Transfer(f[b], inv[a], link.Bx[t], link.By[t], link.Ax[t], link.Ay[t])));
            }
        }
        if (distances.Count == 0)
        {
            return double.PositiveInfinity;
        }
        distances.Sort();
        double median = distances.Count % 2 == 1 ? distances[distances.Count / 2] : 0.5 * (distances[distances.Count / 2 - 1] + distances[distances.Count / 2]);
        return CauchyEfficiency * median / RayleighMedian;
    }

    /// <summary>Median of the distance of a 2D Gaussian error, in units of its sigma per coordinate: sqrt(2 ln 2).</summary>
    private static readonly double RayleighMedian = Math.Sqrt(2 * Math.Log(2));

    /// <summary>Cauchy scale in units of sigma per coordinate: 98.5 % asymptotic efficiency for a two-dimensional Gaussian residual.</summary>
    private const double CauchyEfficiency = 4;

    private JointSolution Pass(IReadOnlyDictionary<int, Transform2D> initial, int maxIterations)
    {
        int n = _vars.Length * _k;
        var theta = new double[n];
        for (int p = 0; p < _vars.Length; p++)
        {
            ModelParameters.FromTransform(_model, ToNormalized(_vars[p], initial[_vars[p]]), theta.AsSpan(p * _k, _k));
        }
        double cost = Cost(theta);
        double initialCost = cost;
        int iterations = 0;
        if (n > 0 && double.IsFinite(cost))
        {
            var run = LevenbergMarquardt.Minimize(new SetProblem(this, theta), cost, maxIterations, Schedule);
            iterations = run.Accepted;
            cost = run.Cost;
        }
        var result = new Dictionary<int, Transform2D> { [_reference] = Transform2D.Identity };
        for (int p = 0; p < _vars.Length; p++)
        {
            result[_vars[p]] = FromNormalized(_vars[p], ModelParameters.ToTransform(_model, theta.AsSpan(p * _k, _k)));
        }
        return new JointSolution(result, iterations, initialCost, cost, _robust / _scale);
    }

    /// <summary>The component's parameters for the shared Levenberg-Marquardt core, normal equations in an envelope.</summary>
    private sealed class SetProblem(JointRefiner refiner, double[] theta) : IDampedProblem
    {
        private readonly EnvelopeNormalEquations _equations = new(refiner.FirstColumns());
        private readonly double[] _trial = new double[theta.Length];

        public void Linearize() => refiner.Assemble(theta, _equations.Normal, _equations.Gradient);

        public bool TrySolveStep(double lambda)
        {
            if (!_equations.TrySolveStep(lambda))
            {
                return false;
            }
            for (int i = 0; i < theta.Length; i++)
            {
                _trial[i] = theta[i] + _equations.Step[i];
            }
            return true;
        }

        public double TrialCost() => refiner.Cost(_trial);

        public void AcceptTrial() => Array.Copy(_trial, theta, theta.Length);
    }

    private Transform2D ToNormalized(int image, Transform2D toReference)
    {
        var (cx, cy) = _centre[image];
        var (rx, ry) = _centre[_reference];
        return (TransformOps.Normalizer(_scale, rx, ry) * toReference * TransformOps.Denormalizer(_scale, cx, cy)).Normalized();
    }

    private Transform2D FromNormalized(int image, Transform2D normalized)
    {
        var (cx, cy) = _centre[image];
        var (rx, ry) = _centre[_reference];
        return (TransformOps.Denormalizer(_scale, rx, ry) * normalized * TransformOps.Normalizer(_scale, cx, cy)).Normalized();
    }

    private (Transform2D[] Forward, Transform2D[] Inverse)? Current(double[] theta)
    {
        var forward = new Transform2D[_vars.Length + 1];
        var inverse = new Transform2D[_vars.Length + 1];
        forward[^1] = Transform2D.Identity;
        inverse[^1] = Transform2D.Identity;
        for (int p = 0; p < _vars.Length; p++)
        {
            forward[p] = ModelParameters.ToTransform(_model, theta.AsSpan(p * _k, _k));
            if (!forward[p].TryInvert(out inverse[p]))
            {
                return null;
            }
        }
        return (forward, inverse);
    }

    private int Slot(int image) => image == _reference ? _vars.Length : _position[image];

    private double Cost(double[] theta)
    {
        var current = Current(theta);
        if (current is null)
        {
            return double.PositiveInfinity;
        }
        var (f, inv) = current.Value;
        double c2 = _robust * _robust;
        double cost = 0;
        foreach (var link in _links)
        {
            int a = Slot(link.A), b = Slot(link.B);
            for (int t = 0; t < link.Ax.Length; t++)
            {
                double r1 = Transfer(f[a], inv[b], link.Ax[t], link.Ay[t], link.Bx[t], link.By[t]);
                double r2 = Transfer(f[b], inv[a], link.Bx[t], link.By[t], link.Ax[t], link.Ay[t]);
                cost += c2 * (Math.Log(1 + r1 / c2) + Math.Log(1 + r2 / c2));
            }
        }
        return double.IsFinite(cost) ? cost : double.PositiveInfinity;
    }

    /// <summary>Squared distance between (bx, by) and the point (ax, ay) carried by 'from' then 'toInverse'.</summary>
    private static double Transfer(in Transform2D from, in Transform2D toInverse, double ax, double ay, double bx, double by)
    {
        var (qx, qy) = from.Apply(ax, ay);
        var (x, y) = toInverse.Apply(qx, qy);
        double d = (x - bx) * (x - bx) + (y - by) * (y - by);
        return double.IsFinite(d) ? d : double.PositiveInfinity;
    }

    private void Assemble(double[] theta, EnvelopeCholesky normal, double[] gradient)
    {
        normal.Clear();
        Array.Clear(gradient);
        var (f, inv) = Current(theta)!.Value;
        Span<double> da = stackalloc double[8], dav = stackalloc double[8];
        Span<double> db = stackalloc double[8], dbv = stackalloc double[8];
        Span<double> ja = stackalloc double[16], jb = stackalloc double[16];
        foreach (var link in _links)
        {
            int a = Slot(link.A), b = Slot(link.B);
            for (int t = 0; t < link.Ax.Length; t++)
            {
                Residual(f, inv, a, b, link.Ax[t], link.Ay[t], link.Bx[t], link.By[t], normal, gradient, da, dav, db, dbv, ja, jb);
                Residual(f, inv, b, a, link.Bx[t], link.By[t], link.Ax[t], link.Ay[t], normal, gradient, da, dav, db, dbv, ja, jb);
            }
        }
    }

    /// <summary>
    /// Adds the residual x - (bx, by), x = T_b^-1(T_a(ax, ay)), to the normal equations. With
    /// T_b(x) = T_a(p): dx/dθa = M^-1 dT_a(p)/dθa and dx/dθb = -M^-1 dT_b(x)/dθb, M = dT_b/dx at x.
    /// </summary>
    private void Residual(Transform2D[] f, Transform2D[] inv, int a, int b, double ax, double ay, double bx, double by,
        EnvelopeCholesky normal, double[] gradient, Span<double> da, Span<double> dav, Span<double> db, Span<double> dbv,
        Span<double> ja, Span<double> jb)
    {
        int fixedSlot = _vars.Length;
        var (qx, qy) = f[a].Apply(ax, ay);
        var (x, y) = inv[b].Apply(qx, qy);
        double rx = x - bx, ry = y - by;
        double r2 = rx * rx + ry * ry;
        if (!double.IsFinite(r2))
        {
            return;
        }
        double weight = 1 / (1 + r2 / (_robust * _robust));
        var (m11, m12, m21, m22) = ModelParameters.PointJacobian(f[b], x, y);
        double det = m11 * m22 - m12 * m21;
        if (Math.Abs(det) < 1e-300)
        {
            return;
        }
        double i11 = m22 / det, i12 = -m12 / det, i21 = -m21 / det, i22 = m11 / det;
        int k = _k;
        if (a != fixedSlot)
        {
            ModelParameters.PointDerivative(_model, f[a], ax, ay, da, dav);
            for (int p = 0; p < k; p++)
            {
                ja[p] = i11 * da[p] + i12 * dav[p];
                ja[k + p] = i21 * da[p] + i22 * dav[p];
            }
        }
        if (b != fixedSlot)
        {
            ModelParameters.PointDerivative(_model, f[b], x, y, db, dbv);
            for (int p = 0; p < k; p++)
            {
                jb[p] = -(i11 * db[p] + i12 * dbv[p]);
                jb[k + p] = -(i21 * db[p] + i22 * dbv[p]);
            }
        }
        if (a != fixedSlot)
        {
            AddBlock(normal, gradient, a, ja, a, ja, weight, rx, ry, diagonal: true);
        }
        if (b != fixedSlot)
        {
            AddBlock(normal, gradient, b, jb, b, jb, weight, rx, ry, diagonal: true);
        }
        if (a != fixedSlot && b != fixedSlot)
        {
            // Only the lower triangle is stored: the block of the later slot against the earlier.
            if (a > b)
            {
                AddBlock(normal, gradient, a, ja, b, jb, weight, 0, 0, diagonal: false);
            }
            else
            {
                AddBlock(normal, gradient, b, jb, a, ja, weight, 0, 0, diagonal: false);
            }
        }
    }

    private void AddBlock(EnvelopeCholesky normal, double[] gradient, int rowSlot, ReadOnlySpan<double> jr,
        int colSlot, ReadOnlySpan<double> jc, double weight, double rx, double ry, bool diagonal)
    {
        int k = _k;
        int r0 = rowSlot * k, c0 = colSlot * k;
        for (int p = 0; p < k; p++)
        {
            double jrp0 = jr[p] * weight, jrp1 = jr[k + p] * weight;
            int last = diagonal ? p : k - 1;
            for (int q = 0; q <= last; q++)
            {
                normal.Add(r0 + p, c0 + q, jrp0 * jc[q] + jrp1 * jc[k + q]);
            }
            if (diagonal)
            {
                gradient[r0 + p] += jrp0 * rx + jrp1 * ry;
            }
        }
    }

    private int[] FirstColumns()
    {
        var firstSlot = new int[_vars.Length];
        for (int p = 0; p < _vars.Length; p++)
        {
            firstSlot[p] = p;
        }
        foreach (var link in _links)
        {
            if (link.A == _reference || link.B == _reference)
            {
                continue;
            }
            int a = _position[link.A], b = _position[link.B];
            firstSlot[Math.Max(a, b)] = Math.Min(firstSlot[Math.Max(a, b)], Math.Min(a, b));
        }
        var first = new int[_vars.Length * _k];
        for (int p = 0; p < _vars.Length; p++)
        {
            for (int q = 0; q < _k; q++)
            {
                first[p * _k + q] = firstSlot[p] * _k;
            }
        }
        return first;
    }

    /// <summary>Reverse Cuthill-McKee order of the variable images over the links among them.</summary>
    private int[] ReverseCuthillMcKee(int[] images)
    {
        var neighbours = images.ToDictionary(i => i, _ => new SortedSet<int>());
        foreach (var link in _links)
        {
            if (neighbours.ContainsKey(link.A) && neighbours.ContainsKey(link.B) && link.A != link.B)
            {
                neighbours[link.A].Add(link.B);
                neighbours[link.B].Add(link.A);
            }
        }
        var order = new List<int>();
        var seen = new HashSet<int>();
        foreach (int start in images.OrderBy(i => neighbours[i].Count).ThenBy(i => i))
        {
            if (!seen.Add(start))
            {
                continue;
            }
            var queue = new Queue<int>();
            queue.Enqueue(start);
            while (queue.Count > 0)
            {
                int u = queue.Dequeue();
                order.Add(u);
                foreach (int v in neighbours[u].OrderBy(v => neighbours[v].Count).ThenBy(v => v))
                {
                    if (seen.Add(v))
                    {
                        queue.Enqueue(v);
                    }
                }
            }
        }
        order.Reverse();
        return [.. order];
    }
}
