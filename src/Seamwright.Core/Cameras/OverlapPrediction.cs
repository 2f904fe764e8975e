using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>A pair the prediction says to add or to stop counting.</summary>
/// <param name="A">First image.</param>
/// <param name="B">Second image.</param>
/// <param name="Fraction">Predicted share of A's area that lands inside B.</param>
public sealed record PredictedPair(int A, int B, double Fraction);

/// <summary>
/// Overlaps predicted from a set's current alignment: a grid of points of one image carried into
/// the other by the set model (the cameras' rays for a rotation set, the plane transforms
/// otherwise); the share that lands inside is the predicted overlap. Used after the first links
/// are estimated: planned pairs that cannot overlap stop counting as failures, and pairs that
/// should overlap but were not planned (the wrap of a full turn, the neighbouring row) are added.
/// </summary>
public static class OverlapPrediction
{
    /// <summary>Grid points per side of the sampled image.</summary>
    public const int GridSide = 12;

    /// <summary>Below this share a pair is not expected to overlap (judgement: a sliver gives too few tie points to verify).</summary>
    public const double NotExpectedBelow = 0.05;

    /// <summary>At or above this share an unplanned pair is added (judgement).</summary>
    public const double AddAtOrAbove = 0.15;

    /// <summary>Predicted share of A's area inside B; null when either image is not placed by the result.</summary>
    public static double? Fraction(SetModelResult result, IReadOnlyList<ImageSize> sizes, int a, int b)
    {
        ArgumentNullException.ThrowIfNull(result);
        ArgumentNullException.ThrowIfNull(sizes);
        Func<double, double, (double U, double V)?>? map = null;
        if (result.Rotation is { } rotation)
        {
            if (rotation.Poses[a] is { } pa && rotation.Poses[b] is { } pb)
            {
                var toB = pb.Rotation.Transpose();
                double fold = pb.Distortion.MonotoneRadiusSquared;
                map = (x, y) =>
                {
                    var (wx, wy, wz) = pa.Ray(x, y);
                    var (cx, cy, cz) = toB.Apply(wx, wy, wz);
                    if (cz <= 1e-6)
                    {
                        return null;
                    }
                    double ix = cx / cz, iy = cy / cz;
                    if (ix * ix + iy * iy > fold)
                    {
                        // Beyond the lens polynomial's fold: outside B's field, though the formula would draw it inside.
                        return null;
                    }
                    var (dx, dy) = pb.Distortion.Distort(ix, iy);
                    return (pb.FocalPx * dx + pb.Cx, pb.FocalPx * dy + pb.Cy);
                };
            }
        }
        else if (result.Alignment.Images[a].ToReference is { } ta && result.Alignment.Images[b].ToReference is { } tb
            && result.Alignment.Images[a].Component == result.Alignment.Images[b].Component && tb.TryInvert(out var fromB))
        {
            var aToB = fromB * ta;
            map = (x, y) => aToB.W(x, y) > 0 && aToB.TryApply(x, y, out double u, out double v) ? (u, v) : null;
        }
        if (map is null)
        {
            return null;
        }
        var sa = sizes[a];
        var sb = sizes[b];
        int inside = 0;
        for (int gy = 0; gy < GridSide; gy++)
        {
            for (int gx = 0; gx < GridSide; gx++)
            {
                double x = (gx + 0.5) * sa.Width / GridSide - 0.5, y = (gy + 0.5) * sa.Height / GridSide - 0.5;
                if (map(x, y) is { } q && q.U >= -0.5 && q.V >= -0.5 && q.U <= sb.Width - 0.5 && q.V <= sb.Height - 0.5)
                {
                    inside++;
                }
            }
        }
        return (double)inside / (GridSide * GridSide);
    }

    /// <summary>
    /// Of the planned pairs, those predicted not to overlap; of the other pairs, those predicted to
    /// overlap by at least <see cref="AddAtOrAbove"/> (either way round), in index order. Only the
    /// pairs whose reach meets (<see cref="OverlapReach"/>) are sampled: the same pairs as sampling
    /// every pair, at a cost that grows with the overlaps rather than with the square of the set.
    /// </summary>
    public static (List<PredictedPair> NotExpected, List<PredictedPair> ToAdd) Plan(SetModelResult result, IReadOnlyList<ImageSize> sizes,
        IReadOnlyCollection<(int A, int B)> planned)
    {
        ArgumentNullException.ThrowIfNull(planned);
        var plannedSet = new HashSet<(int, int)>(planned.Select(p => (Math.Min(p.A, p.B), Math.Max(p.A, p.B))));
        var notExpected = new List<PredictedPair>();
        foreach (var (a, b) in planned)
        {
            if (Shared(result, sizes, a, b) is double f && f < NotExpectedBelow)
            {
                notExpected.Add(new PredictedPair(a, b, f));
            }
        }
        var toAdd = new List<PredictedPair>();
        foreach (var (a, b) in OverlapReach.Of(result, sizes).Candidates())
        {
            if (!plannedSet.Contains((a, b)) && Shared(result, sizes, a, b) is double f && f >= AddAtOrAbove)
            {
                toAdd.Add(new PredictedPair(a, b, f));
            }
        }
        return (notExpected, toAdd);
    }

    /// <summary>The larger of the two directions' shares (a small image inside a large one overlaps fully one way); null when either is not placed.</summary>
    public static double? Shared(SetModelResult result, IReadOnlyList<ImageSize> sizes, int a, int b) =>
        Fraction(result, sizes, a, b) is double ab && Fraction(result, sizes, b, a) is double ba ? Math.Max(ab, ba) : null;
}
