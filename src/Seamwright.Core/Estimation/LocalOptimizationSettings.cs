namespace Seamwright.Core.Estimation;

/// <summary>
/// Local optimisation after Lebeda, Matas, Chum, "Fixing the Locally Optimized RANSAC", BMVC 2012
/// (LO+): run on every new so-far-best model; iterated least squares with a threshold shrinking
/// from <see cref="ThresholdMultiplier"/> x t to t, then an inner RANSAC of least-squares fits on
/// random subsets of the inliers, each followed by the same iterated least squares.
/// </summary>
/// <param name="Enabled">Run local optimisation at all.</param>
/// <param name="InnerRepetitions">Inner RANSAC repetitions; 10 as in the paper (from memory).</param>
/// <param name="LeastSquaresSteps">Iterated least-squares steps; 4 as in the paper (from memory).</param>
/// <param name="ThresholdMultiplier">Starting threshold multiplier of the iterated least squares; 3 (from memory).</param>
/// <param name="InnerSampleFactor">
/// Inner sample size = min(factor x minimal size, half the inliers); 7 (common practice in
/// LO-RANSAC implementations).
/// </param>
public sealed record LocalOptimizationSettings(
    bool Enabled = true,
    int InnerRepetitions = 10,
    int LeastSquaresSteps = 4,
    double ThresholdMultiplier = 3,
    int InnerSampleFactor = 7);
