using System.Globalization;
using Google.OrTools.LinearSolver;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// Exact maximum consensus for small problems (about 60 matches or fewer) as a mixed-integer
/// program over the same inscribed-polygon inequalities as <see cref="ConsensusRefiner"/>: a
/// binary z_i per datum releases its rows by a big-M term (a . theta + b &lt;= M z_i, and
/// w &gt;= tau - M' z_i), and the program minimises the number of released data. M is the largest
/// value a row takes over the parameter box, so no model in the box is cut off. Solved with SCIP
/// through OR-Tools, single thread, default seeds, a node cap and no time cap: deterministic.
/// </summary>
public static class ExactMaxConsensus
{
    /// <summary>Solves the problem; <paramref name="hint"/> (for example a refined model) may speed up the search.</summary>
    public static ExactMaxConsensusResult Solve(
        ReadOnlySpan<Correspondence> matches, MotionModel model, double threshold, ExactMaxConsensusOptions options, Transform2D? hint = null)
    {
        ArgumentNullException.ThrowIfNull(options);
        if (matches.Length > options.MaxMatches)
        {
            throw new ArgumentException($"{matches.Length} matches exceed the exact solver's limit of {options.MaxMatches}.", nameof(matches));
        }
        var rows = new PolygonInequalities(matches, model, threshold, options.PolygonSides, options.Tau);
        using var solver = Solver.CreateSolver("SCIP") ?? throw new InvalidOperationException("OR-Tools SCIP is not available.");
        solver.SuppressOutput();
        solver.SetNumThreads(1);
        // Cutting planes are switched off: on this big-M formulation they cost far more than they
        // prune (measured: 8-20 s down to 1-2 s on 24-match homography problems).
        solver.SetSolverSpecificParametersAsString(
            "limits/nodes = " + options.MaxNodes.ToString(CultureInfo.InvariantCulture) + "\n"
            + "separating/maxrounds = 0\nseparating/maxroundsroot = 0\n");

        int n = rows.Count, p = rows.ParameterCount;
        double bound = options.ParameterBound;
        var theta = new Variable[p];
        for (int j = 0; j < p; j++)
        {
            theta[j] = solver.MakeNumVar(-bound, bound, "h" + j);
        }
        var released = new Variable[n];
        var objective = solver.Objective();
        for (int i = 0; i < n; i++)
        {
            released[i] = solver.MakeBoolVar("z" + i);
            objective.SetCoefficient(released[i], 1);
            for (int k = 0; k < rows.Sides; k++)
            {
                var a = rows.RowCoefficients(i, k);
                double b = rows.RowConstant(i, k);
                double bigM = b + bound * SumAbs(a);
                if (bigM <= 0)
                {
                    continue;
                }
                // a . theta - M z <= -b
                var c = solver.MakeConstraint(double.NegativeInfinity, -b);
                SetRow(c, theta, a);
                c.SetCoefficient(released[i], -bigM);
            }
            if (rows.HasDepth)
            {
                var d = rows.DepthCoefficients(i);
                double shortfall = rows.Tau - 1 + bound * SumAbs(d);
                if (shortfall > 0)
                {
                    // d . theta + M' z >= tau - 1
                    var c = solver.MakeConstraint(rows.Tau - 1, double.PositiveInfinity);
                    SetRow(c, theta, d);
                    c.SetCoefficient(released[i], shortfall);
                }
            }
        }
        objective.SetMinimization();
        if (hint is { } h)
        {
            AddHint(solver, rows, theta, released, h, bound);
        }

        using var parameters = new MPSolverParameters();
        parameters.SetDoubleParam(MPSolverParameters.DoubleParam.RELATIVE_MIP_GAP, 0);
        var status = solver.Solve(parameters);
        long nodes = solver.Nodes();
        if (status is not (Solver.ResultStatus.OPTIMAL or Solver.ResultStatus.FEASIBLE))
        {
            return new ExactMaxConsensusResult(null, 0, 0, false, n, nodes);
        }
        var values = new double[p];
        for (int j = 0; j < p; j++)
        {
            values[j] = theta[j].SolutionValue();
        }
        var transform = rows.ToPixel(values);
        int polygon = 0;
        for (int i = 0; i < n; i++)
        {
            polygon += released[i].SolutionValue() < 0.5 ? 1 : 0;
        }
        int upper = n - (int)Math.Ceiling(objective.BestBound() - 1e-6);
        return new ExactMaxConsensusResult(transform, polygon, DiscConsensus.Count(matches, transform, threshold),
            status == Solver.ResultStatus.OPTIMAL, Math.Max(upper, polygon), nodes);
    }

    private static void AddHint(Solver solver, PolygonInequalities rows, Variable[] theta, Variable[] released, Transform2D hint, double bound)
    {
        var values = new double[rows.ParameterCount];
        if (!rows.TryToParameters(hint, values) || values.Any(v => Math.Abs(v) > bound))
        {
            return;
        }
        var vars = new MPVariableVector();
        var hinted = new List<double>();
        for (int j = 0; j < theta.Length; j++)
        {
            vars.Add(theta[j]);
            hinted.Add(values[j]);
        }
        for (int i = 0; i < released.Length; i++)
        {
            bool inside = rows.Slack(i, values) <= 0 && rows.Depth(i, values) >= rows.Tau;
            vars.Add(released[i]);
            hinted.Add(inside ? 0 : 1);
        }
        solver.SetHint(vars, [.. hinted]);
    }

    private static void SetRow(Constraint c, Variable[] theta, ReadOnlySpan<double> a)
    {
        for (int j = 0; j < a.Length; j++)
        {
            if (a[j] != 0)
            {
                c.SetCoefficient(theta[j], a[j]);
            }
        }
    }

    private static double SumAbs(ReadOnlySpan<double> a)
    {
        double s = 0;
        foreach (double v in a)
        {
            s += Math.Abs(v);
        }
        return s;
    }
}
