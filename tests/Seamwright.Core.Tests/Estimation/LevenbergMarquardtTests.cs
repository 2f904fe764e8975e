using Seamwright.Core.Estimation;

namespace Seamwright.Core.Tests.Estimation;

public sealed class LevenbergMarquardtTests
{
    private static readonly DampingSchedule Schedule = new(
        InitialLambda: 1e-3, Decrease: 10, IncreaseOnReject: 10, IncreaseOnSingular: 10,
        MaxAttempts: 12, MaxLambda: 1e12, RelativeGainTolerance: 1e-15);

    /// <summary>r(p) = (10 (p1 - p0^2), 1 - p0): Rosenbrock's valley as least squares, minimum 0 at (1, 1).</summary>
    private sealed class Rosenbrock(double[] p) : IDampedProblem
    {
        private readonly double[] _jtj = new double[4];
        private readonly double[] _g = new double[2];
        private readonly double[] _trial = new double[2];

        public List<double> Lambdas { get; } = [];

        public List<double> Costs { get; } = [];

        public static double CostAt(double[] q) => Square(10 * (q[1] - q[0] * q[0])) + Square(1 - q[0]);

        public void Linearize()
        {
            double r0 = 10 * (p[1] - p[0] * p[0]), r1 = 1 - p[0];
            double j00 = -20 * p[0], j01 = 10, j10 = -1, j11 = 0;
            _jtj[0] = j00 * j00 + j10 * j10;
            _jtj[1] = _jtj[2] = j00 * j01 + j10 * j11;
            _jtj[3] = j01 * j01 + j11 * j11;
            _g[0] = j00 * r0 + j10 * r1;
            _g[1] = j01 * r0 + j11 * r1;
        }

        public bool TrySolveStep(double lambda)
        {
            Lambdas.Add(lambda);
            double a = _jtj[0] * (1 + lambda), b = _jtj[1], d = _jtj[3] * (1 + lambda);
            double det = a * d - b * b;
            _trial[0] = p[0] + (-d * _g[0] + b * _g[1]) / det;
            _trial[1] = p[1] + (b * _g[0] - a * _g[1]) / det;
            return true;
        }

        public double TrialCost() => CostAt(_trial);

        public void AcceptTrial()
        {
            Array.Copy(_trial, p, 2);
            Costs.Add(CostAt(p));
        }

        private static double Square(double x) => x * x;
    }

    [Fact]
    public void Minimize_Rosenbrock_ReachesTheMinimumWithFallingCost()
    {
        var p = new[] { -1.2, 1.0 };
        var problem = new Rosenbrock(p);
        var run = LevenbergMarquardt.Minimize(problem, Rosenbrock.CostAt(p), 200, Schedule);

        Assert.True(run.Accepted > 5, $"only {run.Accepted} steps");
        Assert.Equal(1, p[0], 1e-6);
        Assert.Equal(1, p[1], 1e-6);
        Assert.Equal(Rosenbrock.CostAt(p), run.Cost);
        for (int i = 1; i < problem.Costs.Count; i++)
        {
            Assert.True(problem.Costs[i] < problem.Costs[i - 1], $"cost rose at step {i}");
        }
    }

    [Fact]
    public void Minimize_IterationCap_StopsAfterThatManyLinearisations()
    {
        var p = new[] { -1.2, 1.0 };
        var run = LevenbergMarquardt.Minimize(new Rosenbrock(p), Rosenbrock.CostAt(p), 3, Schedule);
        Assert.Equal(3, run.Accepted);
        Assert.False(run.StoppedOnSmallGain);
    }

    [Fact]
    public void Minimize_AtTheMinimum_RaisesLambdaByTheScheduleUntilTheAttemptsRunOut()
    {
        var p = new[] { 1.0, 1.0 };
        var problem = new Rosenbrock(p);
        var run = LevenbergMarquardt.Minimize(problem, 0, 50, Schedule);
        Assert.Equal(0, run.Accepted);
        Assert.Equal(12, problem.Lambdas.Count);
        for (int i = 1; i < problem.Lambdas.Count; i++)
        {
            Assert.Equal(problem.Lambdas[i - 1] * 10, problem.Lambdas[i], 1e-9 * problem.Lambdas[i]);
        }
        Assert.Equal(new[] { 1.0, 1.0 }, p);
    }

    [Fact]
    public void Minimize_LambdaCeiling_EndsTheTriesBeforeTheAttemptCap()
    {
        var p = new[] { 1.0, 1.0 };
        var problem = new Rosenbrock(p);
        LevenbergMarquardt.Minimize(problem, 0, 50, Schedule with { MaxAttempts = int.MaxValue, InitialLambda = 1e9 });
        Assert.Equal([1e9, 1e10, 1e11], problem.Lambdas.Select(l => Math.Round(l / 1e9) * 1e9));
    }
}
