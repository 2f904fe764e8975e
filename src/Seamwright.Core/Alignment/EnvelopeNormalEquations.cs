namespace Seamwright.Core.Alignment;

/// <summary>
/// Normal equations of a set held in an envelope (<see cref="EnvelopeCholesky"/>) with their
/// gradient, and the damped step of the joint refinement and the rotation bundle: diagonal
/// d (1 + lambda) + 1e-12, factorised, solved for -gradient.
/// </summary>
internal sealed class EnvelopeNormalEquations
{
    private readonly EnvelopeCholesky _damped;

    public EnvelopeNormalEquations(int[] firstColumns)
    {
        Normal = new EnvelopeCholesky(firstColumns);
        _damped = new EnvelopeCholesky(firstColumns);
        Gradient = new double[firstColumns.Length];
        Step = new double[firstColumns.Length];
    }

    /// <summary>J^T W J, filled by the caller's assembly.</summary>
    public EnvelopeCholesky Normal { get; }

    /// <summary>J^T W r, filled by the caller's assembly.</summary>
    public double[] Gradient { get; }

    /// <summary>The last damped step.</summary>
    public double[] Step { get; }

    /// <summary>Solves the damped system for <see cref="Step"/>; false when it is not positive definite.</summary>
    public bool TrySolveStep(double lambda)
    {
        int n = Step.Length;
        _damped.CopyFrom(Normal);
        for (int i = 0; i < n; i++)
        {
            double d = Normal.Diagonal(i);
            _damped.SetDiagonal(i, d * (1 + lambda) + 1e-12);
        }
        if (!_damped.Factorize())
        {
            return false;
        }
        for (int i = 0; i < n; i++)
        {
            Step[i] = -Gradient[i];
        }
        _damped.Solve(Step);
        return true;
    }
}
