using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>
/// Joint refinement of a camera-rotation set over its tie points as rays (the bundle adjustment of
/// Brown and Lowe, IJCV 2007, section 4, with the ray residual in place of the image residual):
/// for a tie point seen at p in A and q in B, the residual is sqrt(f_A f_B) (R_A d(p) - R_B d(q)),
/// d the unit ray after removing the lens distortion, about the distance in pixels. Parameters: a
/// rotation per image (the reference fixed), a focal length per focal group and the distortion
/// terms per camera. Levenberg-Marquardt (Marquardt 1963) with a Cauchy loss by reweighted normal
/// equations, assembled into an envelope matrix (rotations in index order, camera terms last) and
/// solved by envelope Cholesky.
/// </summary>
internal sealed class RotationBundle
{
    private readonly IReadOnlyList<ImageSize> _sizes;
    private readonly int[] _focalGroup;
    private readonly int[] _lensGroup;
    private readonly int _reference;
    private readonly List<(int A, int B, Correspondence[] Ties)> _links;
    private readonly int _terms;
    private readonly double _robust2;
    private readonly Dictionary<int, int> _slot = [];
    private readonly int _rotationCount;
    private readonly int _focalCount;
    private readonly int _lensCount;

    public RotationBundle(IReadOnlyList<ImageSize> sizes, int[] focalGroup, int[] lensGroup, int reference, int[] images,
        List<(int A, int B, Correspondence[] Ties)> links, DistortionTerms distortion, double robustScalePx)
    {
        _sizes = sizes;
        _focalGroup = focalGroup;
        _lensGroup = lensGroup;
        _reference = reference;
        _links = links;
        _terms = distortion switch { DistortionTerms.K1 => 1, DistortionTerms.K1K2 => 2, _ => 0 };
        _robust2 = robustScalePx * robustScalePx;
        foreach (int i in images.Where(i => i != reference).Order())
        {
            _slot[i] = _slot.Count;
        }
        _rotationCount = _slot.Count;
        _focalCount = focalGroup.Max() + 1;
        _lensCount = lensGroup.Max() + 1;
    }

    /// <summary>The state being refined: rotations per image, focal per focal group, distortion per lens group.</summary>
    public sealed class State(Matrix3[] rotations, double[] focal, LensDistortion[] lens)
    {
        public Matrix3[] Rotations { get; } = rotations;

        public double[] Focal { get; } = focal;

        public LensDistortion[] Lens { get; } = lens;

        public State Copy() => new((Matrix3[])Rotations.Clone(), (double[])Focal.Clone(), (LensDistortion[])Lens.Clone());
    }

    /// <summary>Damping as the joint refinement's (<c>Alignment/JointRefiner</c>), with a gain tolerance of 1e-13.</summary>
    private static readonly DampingSchedule Schedule = new(
        InitialLambda: 1e-4, Decrease: 3, IncreaseOnReject: 4, IncreaseOnSingular: 10,
        MaxAttempts: 12, MaxLambda: double.PositiveInfinity, RelativeGainTolerance: 1e-13);

    private int CameraColumns => _focalCount + _lensCount * _terms;

    private int Size => 3 * _rotationCount + CameraColumns;

    /// <summary>Refines in place; returns the iterations accepted.</summary>
    public int Solve(State state, int maxIterations)
    {
        int n = Size;
        double cost = Cost(state);
        if (n == 0 || !double.IsFinite(cost))
        {
            return 0;
        }
        return LevenbergMarquardt.Minimize(new BundleProblem(this, state), cost, maxIterations, Schedule).Accepted;
    }

    /// <summary>The state for the shared Levenberg-Marquardt core: a rotation increment per image on the manifold, normal equations in an envelope.</summary>
    private sealed class BundleProblem(RotationBundle bundle, State state) : IDampedProblem
    {
        private readonly EnvelopeNormalEquations _equations = new(bundle.FirstColumns());
        private State? _trial;

        public void Linearize() => bundle.Assemble(state, _equations.Normal, _equations.Gradient);

        public bool TrySolveStep(double lambda)
        {
            if (!_equations.TrySolveStep(lambda))
            {
                return false;
            }
            _trial = bundle.Apply(state, _equations.Step);
            return true;
        }

        public double TrialCost() => _trial is null ? double.PositiveInfinity : bundle.Cost(_trial);

        public void AcceptTrial()
        {
            Array.Copy(_trial!.Rotations, state.Rotations, state.Rotations.Length);
            Array.Copy(_trial.Focal, state.Focal, state.Focal.Length);
            Array.Copy(_trial.Lens, state.Lens, state.Lens.Length);
        }
    }

    /// <summary>Robust cost (Cauchy) of a state.</summary>
    public double Cost(State s)
    {
        double cost = 0;
        foreach (var (a, b, ties) in _links)
        {
            foreach (var t in ties)
            {
                var (rx, ry, rz) = Residual(s, a, b, t);
                double r2 = rx * rx + ry * ry + rz * rz;
                cost += _robust2 * Math.Log(1 + r2 / _robust2);
            }
        }
        return double.IsFinite(cost) ? cost : double.PositiveInfinity;
    }

    /// <summary>Residual lengths of every tie point of a link, pixels.</summary>
    public double[] LinkResiduals(State s, int link)
    {
        var (a, b, ties) = _links[link];
        var result = new double[ties.Length];
        for (int i = 0; i < ties.Length; i++)
        {
            var (rx, ry, rz) = Residual(s, a, b, ties[i]);
            result[i] = Math.Sqrt(rx * rx + ry * ry + rz * rz);
        }
        return result;
    }

    /// <summary>Unit ray of pixel (u, v) of image i in its own frame.</summary>
    public (double X, double Y, double Z) LocalRay(State s, int image, double u, double v)
    {
        double f = s.Focal[_focalGroup[image]];
        var size = _sizes[image];
        var (x, y) = s.Lens[_lensGroup[image]].Undistort((u - (size.Width - 1) / 2.0) / f, (v - (size.Height - 1) / 2.0) / f);
        double n = Math.Sqrt(x * x + y * y + 1);
        return (x / n, y / n, 1 / n);
    }

    private (double X, double Y, double Z) Residual(State s, int a, int b, in Correspondence t)
    {
        var (ax, ay, az) = LocalRay(s, a, t.X1, t.Y1);
        var (bx, by, bz) = LocalRay(s, b, t.X2, t.Y2);
        var (wax, way, waz) = s.Rotations[a].Apply(ax, ay, az);
        var (wbx, wby, wbz) = s.Rotations[b].Apply(bx, by, bz);
        double scale = Math.Sqrt(s.Focal[_focalGroup[a]] * s.Focal[_focalGroup[b]]);
        return (scale * (wax - wbx), scale * (way - wby), scale * (waz - wbz));
    }

    private State? Apply(State s, double[] step)
    {
        var next = s.Copy();
        foreach (var (image, slot) in _slot)
        {
            next.Rotations[image] = s.Rotations[image] * Matrix3.Exp(step[3 * slot], step[3 * slot + 1], step[3 * slot + 2]);
        }
        int c = 3 * _rotationCount;
        for (int g = 0; g < _focalCount; g++)
        {
            next.Focal[g] = s.Focal[g] + step[c + g];
            if (!(next.Focal[g] > 0))
            {
                return null;
            }
        }
        c += _focalCount;
        for (int g = 0; g < _lensCount && _terms > 0; g++)
        {
            var l = s.Lens[g];
            next.Lens[g] = new LensDistortion(l.K1 + step[c + g * _terms], _terms > 1 ? l.K2 + step[c + g * _terms + 1] : 0);
        }
        return next;
    }

    private int[] FirstColumns()
    {
        int n = Size;
        var first = new int[n];
        var firstSlot = new int[_rotationCount];
        for (int p = 0; p < _rotationCount; p++)
        {
            firstSlot[p] = p;
        }
        foreach (var (a, b, _) in _links)
        {
            if (_slot.TryGetValue(a, out int sa) && _slot.TryGetValue(b, out int sb))
            {
                firstSlot[Math.Max(sa, sb)] = Math.Min(firstSlot[Math.Max(sa, sb)], Math.Min(sa, sb));
            }
        }
        for (int p = 0; p < _rotationCount; p++)
        {
            for (int q = 0; q < 3; q++)
            {
                first[3 * p + q] = 3 * firstSlot[p];
            }
        }
        // Camera terms touch every image: their rows are full.
        return first;
    }

    private void Assemble(State s, EnvelopeCholesky normal, double[] gradient)
    {
        normal.Clear();
        Array.Clear(gradient);
        int cameraStart = 3 * _rotationCount;
        Span<int> cols = stackalloc int[12];
        Span<double> jx = stackalloc double[12], jy = stackalloc double[12], jz = stackalloc double[12];
        foreach (var (a, b, ties) in _links)
        {
            int count = 0;
            int rotA = _slot.TryGetValue(a, out int sa) ? 3 * sa : -1;
            int rotB = _slot.TryGetValue(b, out int sb) ? 3 * sb : -1;
            var camera = CameraColumnsOf(a, b, cameraStart);
            foreach (var t in ties)
            {
                var (ax, ay, az) = LocalRay(s, a, t.X1, t.Y1);
                var (bx, by, bz) = LocalRay(s, b, t.X2, t.Y2);
                double scale = Math.Sqrt(s.Focal[_focalGroup[a]] * s.Focal[_focalGroup[b]]);
                var (wax, way, waz) = s.Rotations[a].Apply(ax, ay, az);
                var (wbx, wby, wbz) = s.Rotations[b].Apply(bx, by, bz);
                double rx = scale * (wax - wbx), ry = scale * (way - wby), rz = scale * (waz - wbz);
                double r2 = rx * rx + ry * ry + rz * rz;
                if (!double.IsFinite(r2))
                {
                    continue;
                }
                double weight = 1 / (1 + r2 / _robust2);
                count = 0;
                // d(R exp(w) d)/dw = -R [d]x : column k is R (e_k x d).
                if (rotA >= 0)
                {
                    AddRotation(s.Rotations[a], ax, ay, az, scale, rotA, cols, jx, jy, jz, ref count);
                }
                if (rotB >= 0)
                {
                    AddRotation(s.Rotations[b], bx, by, bz, -scale, rotB, cols, jx, jy, jz, ref count);
                }
                foreach (int column in camera)
                {
                    var (dx, dy, dz) = CameraDerivative(s, a, b, t, column - cameraStart);
                    cols[count] = column;
                    jx[count] = dx;
                    jy[count] = dy;
                    jz[count] = dz;
                    count++;
                }
                for (int p = 0; p < count; p++)
                {
                    gradient[cols[p]] += weight * (jx[p] * rx + jy[p] * ry + jz[p] * rz);
                    for (int q = 0; q < count; q++)
                    {
                        if (cols[q] <= cols[p])
                        {
                            normal.Add(cols[p], cols[q], weight * (jx[p] * jx[q] + jy[p] * jy[q] + jz[p] * jz[q]));
                        }
                    }
                }
            }
        }
    }

    private static void AddRotation(in Matrix3 r, double dx, double dy, double dz, double scale, int column,
        Span<int> cols, Span<double> jx, Span<double> jy, Span<double> jz, ref int count)
    {
        // e_x x d = (0, -dz, dy); e_y x d = (dz, 0, -dx); e_z x d = (-dy, dx, 0)
        (double, double, double)[] axes = [(0, -dz, dy), (dz, 0, -dx), (-dy, dx, 0)];
        for (int k = 0; k < 3; k++)
        {
            var (cx, cy, cz) = r.Apply(axes[k].Item1, axes[k].Item2, axes[k].Item3);
            cols[count] = column + k;
            jx[count] = scale * cx;
            jy[count] = scale * cy;
            jz[count] = scale * cz;
            count++;
        }
    }

    /// <summary>Distinct camera-term columns a link's residual depends on.</summary>
    private int[] CameraColumnsOf(int a, int b, int start)
    {
        var set = new SortedSet<int> { start + _focalGroup[a], start + _focalGroup[b] };
        for (int k = 0; k < _terms; k++)
        {
            set.Add(start + _focalCount + _lensGroup[a] * _terms + k);
            set.Add(start + _focalCount + _lensGroup[b] * _terms + k);
        }
        return [.. set];
    }

    /// <summary>Central difference of the residual in one camera term.</summary>
    private (double X, double Y, double Z) CameraDerivative(State s, int a, int b, in Correspondence t, int term)
    {
        double h;
        if (term < _focalCount)
        {
            double f = s.Focal[term];
            h = 1e-6 * f;
            s.Focal[term] = f + h;
            var plus = Residual(s, a, b, t);
            s.Focal[term] = f - h;
            var minus = Residual(s, a, b, t);
            s.Focal[term] = f;
            return ((plus.X - minus.X) / (2 * h), (plus.Y - minus.Y) / (2 * h), (plus.Z - minus.Z) / (2 * h));
        }
        int lensTerm = term - _focalCount;
        int g = lensTerm / _terms, k = lensTerm % _terms;
        var l = s.Lens[g];
        h = 1e-6;
        s.Lens[g] = k == 0 ? l with { K1 = l.K1 + h } : l with { K2 = l.K2 + h };
        var p = Residual(s, a, b, t);
        s.Lens[g] = k == 0 ? l with { K1 = l.K1 - h } : l with { K2 = l.K2 - h };
        var m = Residual(s, a, b, t);
        s.Lens[g] = l;
        return ((p.X - m.X) / (2 * h), (p.Y - m.Y) / (2 * h), (p.Z - m.Z) / (2 * h));
    }
}
