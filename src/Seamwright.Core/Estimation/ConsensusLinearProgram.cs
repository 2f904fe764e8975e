using System.Diagnostics;
using Google.OrTools.LinearSolver;

namespace Seamwright.Core.Estimation;

/// <summary>
/// One GLOP model holding the polygon rows of every datum: "minimise the slack sum of the active
/// data" over the parameters, a slack per datum and (homography only) a cheirality slack per datum
/// on w &gt;= tau. The active set is chosen only through objective coefficients (1 on an active
/// slack, a large cost on an active cheirality slack, 0 for the rest), so successive solves differ
/// only in the objective and GLOP re-solves from its previous basis instead of rebuilding.
/// </summary>
internal sealed class ConsensusLinearProgram : IDisposable
{
    private readonly PolygonInequalities _rows;
    private readonly Solver _solver;
    private readonly Variable[] _parameters;
    private readonly Variable[] _slacks;
    private readonly Variable[] _cheirality;
    private readonly bool[] _active;
    private readonly double _cheiralityCost;

    public ConsensusLinearProgram(PolygonInequalities rows, double cheiralityCost)
    {
        _rows = rows;
        _cheiralityCost = cheiralityCost;
        _solver = Solver.CreateSolver("GLOP") ?? throw new InvalidOperationException("OR-Tools GLOP is not available.");
        _solver.SuppressOutput();
        int n = rows.Count, p = rows.ParameterCount;
        _parameters = new Variable[p];
        for (int j = 0; j < p; j++)
        {
            _parameters[j] = _solver.MakeNumVar(double.NegativeInfinity, double.PositiveInfinity, "h" + j);
        }
        _slacks = new Variable[n];
        _cheirality = new Variable[rows.HasDepth ? n : 0];
        _active = new bool[n];
        for (int i = 0; i < n; i++)
        {
            _slacks[i] = _solver.MakeNumVar(0, double.PositiveInfinity, "s" + i);
            for (int k = 0; k < rows.Sides; k++)
            {
                // a . theta - slack <= -b
                var c = _solver.MakeConstraint(double.NegativeInfinity, -rows.RowConstant(i, k));
                var a = rows.RowCoefficients(i, k);
                for (int j = 0; j < p; j++)
                {
                    if (a[j] != 0)
                    {
                        c.SetCoefficient(_parameters[j], a[j]);
                    }
                }
                c.SetCoefficient(_slacks[i], -1);
            }
            if (rows.HasDepth)
            {
                // d . theta + 1 + g >= tau
                _cheirality[i] = _solver.MakeNumVar(0, double.PositiveInfinity, "g" + i);
                var c = _solver.MakeConstraint(rows.Tau - 1, double.PositiveInfinity);
                var d = rows.DepthCoefficients(i);
                for (int j = 0; j < p; j++)
                {
                    if (d[j] != 0)
                    {
                        c.SetCoefficient(_parameters[j], d[j]);
                    }
                }
                c.SetCoefficient(_cheirality[i], 1);
            }
        }
        _solver.Objective().SetMinimization();
    }

    /// <summary>
    /// Solves for the given active data; writes the parameters and returns the objective value,
    /// or NaN when GLOP reports no optimal solution.
    /// </summary>
    public double Solve(ReadOnlySpan<int> activeData, Span<double> theta)
    {
        var objective = _solver.Objective();
        Span<bool> wanted = _active.Length <= 4096 ? stackalloc bool[_active.Length] : new bool[_active.Length];
        foreach (int i in activeData)
        {
            wanted[i] = true;
        }
        for (int i = 0; i < _active.Length; i++)
        {
            if (wanted[i] != _active[i])
            {
                _active[i] = wanted[i];
                objective.SetCoefficient(_slacks[i], wanted[i] ? 1 : 0);
                if (_rows.HasDepth)
                {
                    objective.SetCoefficient(_cheirality[i], wanted[i] ? _cheiralityCost : 0);
                }
            }
        }
        long start = Stopwatch.GetTimestamp();
        var status = _solver.Solve();
        SolveMilliseconds += Stopwatch.GetElapsedTime(start).TotalMilliseconds;
        SimplexIterations += _solver.Iterations();
        if (status != Solver.ResultStatus.OPTIMAL)
        {
            return double.NaN;
        }
        for (int j = 0; j < _parameters.Length; j++)
        {
            theta[j] = _parameters[j].SolutionValue();
        }
        return objective.Value();
    }

    /// <summary>Wall-clock time spent in GLOP so far (diagnostics only).</summary>
    public double SolveMilliseconds { get; private set; }

    /// <summary>Simplex iterations summed over the solves (diagnostics only).</summary>
    public long SimplexIterations { get; private set; }

    public void Dispose() => _solver.Dispose();
}
