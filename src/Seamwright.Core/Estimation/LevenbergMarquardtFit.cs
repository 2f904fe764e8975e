using MathNet.Numerics.LinearAlgebra;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>A least-squares fit of the forward transfer error and the covariance of its parameters.</summary>
/// <param name="Transform">The fitted transform (pixels of the first image to the second, m33 = 1).</param>
/// <param name="SumSquaredPx">Sum of squared forward transfer errors over the data, px^2.</param>
/// <param name="Iterations">Levenberg-Marquardt iterations run.</param>
/// <param name="CornerSigmaPx">
/// Largest over the given corners of the standard deviation (px, along the worst direction) of the
/// corner's mapped position, from sigma^2 (J^T J)^-1 with sigma^2 = SSE / (2n - dof). NaN when the
/// data leave no redundancy. Ignores selection effects (the data were chosen by the model) and
/// model error (the scene may not be exactly of the model's family).
/// </param>
public sealed record LeastSquaresFit(Transform2D Transform, double SumSquaredPx, int Iterations, double CornerSigmaPx);

/// <summary>
/// Levenberg-Marquardt (the shared <see cref="LevenbergMarquardt"/> core; Marquardt, SIAM J. Appl.
/// Math. 1963, damping of the diagonal) on the sum of squared forward transfer errors, for any motion model, computed on Hartley-normalised
/// coordinates of the data (an isotropic scale of the residuals: the minimiser is the same).
/// </summary>
public static class LevenbergMarquardtFit
{
    private const int MaxIterations = 50;

    /// <summary>Damping of the diagonal as in Marquardt 1963: lambda from 1e-3, divided and multiplied by 10, up to 1e12.</summary>
    private static readonly DampingSchedule Schedule = new(
        InitialLambda: 1e-3, Decrease: 10, IncreaseOnReject: 10, IncreaseOnSingular: 10,
        MaxAttempts: int.MaxValue, MaxLambda: 1e12, RelativeGainTolerance: 1e-15);

    public static LeastSquaresFit Fit(MotionModel model, ReadOnlySpan<Correspondence> data, Transform2D initial, ReadOnlySpan<(double X, double Y)> corners)
    {
        var family = MotionFamily.Of(model);
        int dof = family.ParameterCount;
        var (n1, n2) = HartleyNormalization.ForMatches(data);
        var pts = new (double X, double Y, double U, double V)[data.Length];
        for (int i = 0; i < data.Length; i++)
        {
            var (x, y) = n1.Apply(data[i].X1, data[i].Y1);
            var (u, v) = n2.Apply(data[i].X2, data[i].Y2);
            pts[i] = (x, y, u, v);
        }
        var hn = (n2.Matrix * initial * n1.InverseMatrix).Normalized();
        var p = new double[dof];
        family.ToParameters(hn, p);
        double cost = Cost(family, p, pts);
        int iterations = 0;
        if (double.IsFinite(cost))
        {
            var run = LevenbergMarquardt.Minimize(new PairProblem(family, pts, p), cost, MaxIterations, Schedule);
            // An accepted step whose gain was too small to continue is not counted as an iteration.
            iterations = run.Accepted - (run.StoppedOnSmallGain ? 1 : 0);
        }
        var fitted = family.FromParameters(p);
        var transform = (n2.InverseMatrix * fitted * n1.Matrix).Normalized();
        double sse = 0;
        foreach (ref readonly var m in data)
        {
            sse += TransferError.ForwardSquared(transform, m);
        }
        double sigma = CornerSigma(family, p, pts, n1, n2, corners);
        return new LeastSquaresFit(transform, sse, iterations, sigma);
    }

    /// <summary>The pair's normal equations, dense (at most 8 parameters), damped by lambda max(J^T J_ii, 1e-12).</summary>
    private sealed class PairProblem(MotionFamily family, (double X, double Y, double U, double V)[] pts, double[] p) : IDampedProblem
    {
        private readonly int _dof = p.Length;
        private readonly double[] _jtj = new double[p.Length * p.Length];
        private readonly double[] _jtr = new double[p.Length];
        private readonly double[] _trial = new double[p.Length];

        public void Linearize() => Normal(family, p, pts, _jtj, _jtr);

        public bool TrySolveStep(double lambda)
        {
            int dof = _dof;
            var a = Matrix<double>.Build.Dense(dof, dof, (i, j) => _jtj[i * dof + j] + (i == j ? lambda * Math.Max(_jtj[i * dof + i], 1e-12) : 0));
            var b = Vector<double>.Build.Dense(dof, i => -_jtr[i]);
            var delta = a.Solve(b);
            for (int i = 0; i < dof; i++)
            {
                _trial[i] = p[i] + delta[i];
            }
            return true;
        }

        public double TrialCost() => Cost(family, _trial, pts);

        public void AcceptTrial() => Array.Copy(_trial, p, _dof);
    }

    private static double Cost(MotionFamily family, ReadOnlySpan<double> p, (double X, double Y, double U, double V)[] pts)
    {
        var h = family.FromParameters(p);
        double sum = 0;
        foreach (var (x, y, u, v) in pts)
        {
            double w = h.M31 * x + h.M32 * y + h.M33;
            if (!(w > 0))
            {
                return double.PositiveInfinity;
            }
            double du = (h.M11 * x + h.M12 * y + h.M13) / w - u;
            double dv = (h.M21 * x + h.M22 * y + h.M23) / w - v;
            sum += du * du + dv * dv;
        }
        return double.IsFinite(sum) ? sum : double.PositiveInfinity;
    }

    private static void Normal(MotionFamily family, ReadOnlySpan<double> p, (double X, double Y, double U, double V)[] pts, double[] jtj, double[] jtr)
    {
        int dof = p.Length;
        Array.Clear(jtj);
        Array.Clear(jtr);
        var h = family.FromParameters(p);
        Span<double> du = stackalloc double[8];
        Span<double> dv = stackalloc double[8];
        foreach (var (x, y, u0, v0) in pts)
        {
            if (!family.MapWithJacobian(h, x, y, out double u, out double v, du, dv))
            {
                continue;
            }
            double ru = u - u0, rv = v - v0;
            for (int i = 0; i < dof; i++)
            {
                jtr[i] += du[i] * ru + dv[i] * rv;
                for (int j = i; j < dof; j++)
                {
                    jtj[i * dof + j] += du[i] * du[j] + dv[i] * dv[j];
                }
            }
        }
        for (int i = 0; i < dof; i++)
        {
            for (int j = 0; j < i; j++)
            {
                jtj[i * dof + j] = jtj[j * dof + i];
            }
        }
    }

    private static double CornerSigma(MotionFamily family, double[] p, (double X, double Y, double U, double V)[] pts,
        in HartleyNormalization n1, in HartleyNormalization n2, ReadOnlySpan<(double X, double Y)> corners)
    {
        int dof = p.Length;
        int redundancy = 2 * pts.Length - dof;
        if (redundancy <= 0 || corners.IsEmpty)
        {
            return double.NaN;
        }
        var jtj = new double[dof * dof];
        var jtr = new double[dof];
        Normal(family, p, pts, jtj, jtr);
        double sigma2 = Cost(family, p, pts) / redundancy;
        var info = Matrix<double>.Build.DenseOfRowMajor(dof, dof, jtj);
        if (!(info.ConditionNumber() < 1e14))
        {
            return double.NaN;
        }
        var cov = info.Inverse() * sigma2;
        var h = family.FromParameters(p);
        Span<double> du = stackalloc double[8];
        Span<double> dv = stackalloc double[8];
        double worst = 0;
        foreach (var (cx, cy) in corners)
        {
            var (x, y) = n1.Apply(cx, cy);
            if (!family.MapWithJacobian(h, x, y, out _, out _, du, dv))
            {
                return double.PositiveInfinity;
            }
            double suu = 0, suv = 0, svv = 0;
            for (int i = 0; i < dof; i++)
            {
                for (int j = 0; j < dof; j++)
                {
                    double c = cov[i, j];
                    suu += du[i] * c * du[j];
                    suv += du[i] * c * dv[j];
                    svv += dv[i] * c * dv[j];
                }
            }
            double tr = suu + svv, det = suu * svv - suv * suv;
            double largest = tr / 2 + Math.Sqrt(Math.Max(0, tr * tr / 4 - det));
            // Back to pixels of the second image: normalised units are pixels times the scale.
            worst = Math.Max(worst, Math.Sqrt(Math.Max(largest, 0)) / n2.Scale);
        }
        return worst;
    }
}
