namespace Seamwright.Core.Estimation;

/// <summary>
/// One damped least-squares problem for <see cref="LevenbergMarquardt.Minimize"/>: it owns its
/// point, its normal equations and their linear algebra (dense for a pair, an envelope Cholesky
/// for a set), and its damping form; the core owns the iteration and the damping schedule.
/// </summary>
internal interface IDampedProblem
{
    /// <summary>Builds the normal equations J^T J and the gradient J^T r at the current point.</summary>
    void Linearize();

    /// <summary>Solves the normal equations damped by <paramref name="lambda"/> for a step; false when the damped matrix cannot be factorised.</summary>
    bool TrySolveStep(double lambda);

    /// <summary>The cost at the current point moved by the last step (positive infinity when undefined).</summary>
    double TrialCost();

    /// <summary>Makes the last trial point the current one.</summary>
    void AcceptTrial();
}

/// <summary>
/// The damping schedule of one caller: lambda starts at <paramref name="InitialLambda"/>, is divided
/// by <paramref name="Decrease"/> (floor <paramref name="MinLambda"/>) on an accepted step and
/// multiplied by <paramref name="IncreaseOnReject"/> on a rejected one, or by
/// <paramref name="IncreaseOnSingular"/> when the damped system cannot be factorised. At most
/// <paramref name="MaxAttempts"/> tries per iteration, and none once lambda reaches
/// <paramref name="MaxLambda"/>. The run stops when no try lowers the cost or when an accepted
/// step gains at most <paramref name="RelativeGainTolerance"/> times the new cost.
/// </summary>
internal sealed record DampingSchedule(
    double InitialLambda, double Decrease, double IncreaseOnReject, double IncreaseOnSingular,
    int MaxAttempts, double MaxLambda, double RelativeGainTolerance, double MinLambda = 1e-12);

/// <summary>What one run did: accepted steps, the final cost, and whether it stopped on a too small gain.</summary>
internal readonly record struct DampedRun(int Accepted, double Cost, bool StoppedOnSmallGain);

/// <summary>
/// The one Levenberg-Marquardt iteration (Levenberg, Q. Appl. Math. 1944; Marquardt, SIAM J. Appl.
/// Math. 1963) shared by the pair polish (<see cref="LevenbergMarquardtFit"/>), the joint
/// refinement of a planar set (<c>Alignment/JointRefiner</c>) and the rotation bundle
/// (<c>Cameras/RotationBundle</c>): linearise, try damped steps until one lowers the cost, accept
/// it, repeat. Only steps that lower the cost are taken, so the cost never rises.
/// </summary>
internal static class LevenbergMarquardt
{
    /// <param name="problem">The problem, at its starting point.</param>
    /// <param name="cost">The cost at the starting point (finite).</param>
    /// <param name="maxIterations">Most linearisations.</param>
    /// <param name="schedule">The caller's damping schedule.</param>
    public static DampedRun Minimize<TProblem>(TProblem problem, double cost, int maxIterations, DampingSchedule schedule)
        where TProblem : IDampedProblem
    {
        ArgumentNullException.ThrowIfNull(problem);
        ArgumentNullException.ThrowIfNull(schedule);
        double lambda = schedule.InitialLambda;
        int accepted = 0;
        for (int it = 0; it < maxIterations; it++)
        {
            problem.Linearize();
            bool lowered = false;
            double trialCost = cost;
            for (int attempt = 0; attempt < schedule.MaxAttempts && lambda < schedule.MaxLambda && !lowered; attempt++)
            {
                if (!problem.TrySolveStep(lambda))
                {
                    lambda *= schedule.IncreaseOnSingular;
                    continue;
                }
                trialCost = problem.TrialCost();
                if (trialCost < cost)
                {
                    lowered = true;
                    lambda = Math.Max(lambda / schedule.Decrease, schedule.MinLambda);
                }
                else
                {
                    lambda *= schedule.IncreaseOnReject;
                }
            }
            if (!lowered)
            {
                break;
            }
            accepted++;
            double gain = cost - trialCost;
            problem.AcceptTrial();
            cost = trialCost;
            if (gain <= schedule.RelativeGainTolerance * Math.Max(cost, 1e-300))
            {
                return new DampedRun(accepted, cost, true);
            }
        }
        return new DampedRun(accepted, cost, false);
    }
}
