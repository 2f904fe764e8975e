using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Quality;
using Seamwright.Core.Synthetic;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Estimation;

/// <summary>
/// Synthetic sweeps with known transforms (issue 2): outlier ratio 0-80 %, noise 0-2 px (root mean
/// square length of the displacement), 20-2000 matches. Cells with at least 15 inliers must be
/// accepted with every corner of the first image within 2 thresholds of its true image; cells with
/// fewer than the model's minimum + 4 inliers must not be accepted.
/// </summary>
/// <remarks>
/// Noise is Gaussian on the second point with the given root mean square displacement (sigma =
/// rms / sqrt 2 per coordinate). The inlier count of a cell is the number generated from the truth,
/// some of which noise pushes beyond the threshold.
/// </remarks>
public class SyntheticSweepTests(ITestOutputHelper output)
{
    internal static readonly ImageSize SizeA = new(1200, 900);
    internal static readonly ImageSize SizeB = new(1200, 900);

    internal static Transform2D TruthFor(MotionModel model) => model switch
    {
        MotionModel.Translation => Transform2D.Translation(-310.5, 45.25),
        MotionModel.Similarity => Similarity(0.9, 6 * Math.PI / 180, -250, 80),
        MotionModel.Affine => new Transform2D(0.95, 0.08, -240, -0.05, 1.04, 60, 0, 0, 1),
        _ => new Transform2D(0.95, 0.08, -240, -0.05, 1.04, 60, 2e-5, -3e-5, 1),
    };

    private static Transform2D Similarity(double scale, double angle, double tx, double ty) =>
        new(scale * Math.Cos(angle), -scale * Math.Sin(angle), tx, scale * Math.Sin(angle), scale * Math.Cos(angle), ty, 0, 0, 1);

    [Theory]
    [InlineData(MotionModel.Translation)]
    [InlineData(MotionModel.Similarity)]
    [InlineData(MotionModel.Affine)]
    [InlineData(MotionModel.Homography)]
    public void Estimate_SweepOfOutliersNoiseAndCounts_AcceptsClearCellsAndRefusesThinOnes(MotionModel model)
    {
        var options = EstimationOptions.Default with { Model = model };
        var truth = TruthFor(model);
        var corners = Transform2D.Corners(SizeA.Width, SizeA.Height);
        int minimal = MotionFamily.Of(model).MinimalSampleSize;
        var failures = new List<string>();
        int cells = 0, mustAccept = 0, mustRefuse = 0;
        ulong seed = 100;
        foreach (int count in new[] { 20, 60, 300, 2000 })
        {
            foreach (double outliers in new[] { 0.0, 0.3, 0.6, 0.7, 0.8 })
            {
                foreach (double noise in new[] { 0.0, 1.0, 2.0 })
                {
                    var set = SyntheticMatches.Generate(truth, SizeA, SizeB, count, outliers, noise, seed++);
                    // The full flow up to 300 matches; sampling and polish alone at 2000, where the LP
                    // refinement costs seconds per cell (its speed is the benchmark's subject, and it
                    // never lowers consensus by contract, which its own tests check).
                    var e = PairEstimator.Estimate(set.Matches, SizeA, SizeB, options with { Refine = count <= 300 });
                    double cornerError = e.Transform is { } h ? Transform2D.MaxPointDistance(h, truth, corners) : double.PositiveInfinity;
                    int inliers = set.InlierCount;
                    cells++;
                    string cell = string.Create(CultureInfo.InvariantCulture,
                        $"{model} n={count} out={outliers:0.0} noise={noise:0.0} inliers={inliers} -> {e.Status} final={e.Consensus.Final} runnerUp={e.Consensus.RunnerUp} corner={cornerError:0.00} px sigma={e.CornerSigmaPx:0.00} it={e.Iterations}");
                    output.WriteLine(cell + (e.Reasons.Length > 0 ? " [" + string.Join("; ", e.Reasons) + "]" : ""));
                    if (inliers >= 15)
                    {
                        mustAccept++;
                        if (e.Status != PairStatus.Accepted || !(cornerError <= 2 * options.Threshold))
                        {
                            failures.Add(cell);
                        }
                    }
                    else if (inliers < minimal + 4)
                    {
                        mustRefuse++;
                        if (e.Status == PairStatus.Accepted)
                        {
                            failures.Add(cell);
                        }
                    }
                }
            }
        }
        output.WriteLine($"{cells} cells, {mustAccept} must be accepted, {mustRefuse} must not be, {failures.Count} failures");
        Assert.True(mustRefuse > 0 && mustAccept > 0, "the sweep must hold cells of both kinds");
        Assert.True(failures.Count == 0, "failed cells:\n" + string.Join("\n", failures));
    }
}
