using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>The planar model a set is aligned in, with the scores behind the choice.</summary>
/// <param name="Model">The chosen model.</param>
/// <param name="Reason">Why, in words.</param>
/// <param name="Scores">GRIC summed over the links, per candidate model (lower is better).</param>
public sealed record PlanarModelChoice(MotionModel Model, string Reason, IReadOnlyDictionary<MotionModel, double> Scores)
{
    /// <summary>
    /// The lowest-freedom planar model that explains the links' tie points, by Torr's geometric
    /// robust information criterion (GRIC; Torr, "Geometric motion segmentation and model
    /// selection", Phil. Trans. R. Soc. A 1998): per link and model, sum of rho(e^2 / sigma^2) +
    /// lambda1 d n + lambda2 k, with rho(x) = min(x, lambda3 (r - d)), r = 4 (a correspondence),
    /// d = 2 (every planar model is a 2D manifold), lambda1 = ln r, lambda2 = ln(r n), lambda3 = 2,
    /// k the model's parameters; e the forward transfer error of the least-squares fit and sigma
    /// per coordinate from the most general candidate's fit. Summed over the links; the lowest sum
    /// wins. A chain of homographies accumulates perspective the tie points never asked for; the
    /// chosen model keeps a flat sweep flat.
    /// </summary>
    /// <param name="links">Usable links with their tie points.</param>
    /// <param name="mostGeneral">The most general model allowed (the pairs' estimation model).</param>
    public static PlanarModelChoice Choose(IReadOnlyList<AlignmentLink> links, MotionModel mostGeneral)
    {
        ArgumentNullException.ThrowIfNull(links);
        var candidates = MotionFamily.All.Where(f => f.IsSpecialCaseOf(MotionFamily.Of(mostGeneral))).Select(f => f.Model).ToArray();
        // Each link's scores on its own (in parallel), then summed in link order: the same sums whatever the thread count.
        var perLink = new double[]?[links.Count];
        Parallel.For(0, links.Count, i => perLink[i] = LinkScores(links[i].TiePoints, candidates, mostGeneral));
        var scores = candidates.ToDictionary(m => m, _ => 0.0);
        int used = 0;
        foreach (var linkScores in perLink)
        {
            if (linkScores is null)
            {
                continue;
            }
            used++;
            for (int c = 0; c < candidates.Length; c++)
            {
                scores[candidates[c]] += linkScores[c];
            }
        }
        if (used == 0)
        {
            return new PlanarModelChoice(mostGeneral, $"no link has enough tie points to compare models; kept {Name(mostGeneral)}", scores);
        }
        var best = candidates.OrderBy(m => scores[m]).ThenBy(m => m).First();
        string detail = string.Join(", ", candidates.Select(m => string.Create(CultureInfo.InvariantCulture, $"{Name(m)} {scores[m]:0}")));
        return new PlanarModelChoice(best, $"{Name(best)} explains the tie points of {used} links best by GRIC (Torr 1998; {detail})", scores);
    }

    /// <summary>One link's GRIC per candidate (in candidate order); null when the link cannot compare models.</summary>
    private static double[]? LinkScores(Correspondence[] ties, MotionModel[] candidates, MotionModel mostGeneral)
    {
        int n = ties.Length;
        int k = ModelParameters.Count(mostGeneral);
        if (n < 2 * k)
        {
            return null;
        }
        var residuals = candidates.Select(m => Fit(m, ties) is { } t ? ties.Select(c => TransferError.ForwardSquared(t, c)).ToArray() : []).ToArray();
        var general = residuals[Array.IndexOf(candidates, mostGeneral)];
        if (general.Length == 0)
        {
            return null;
        }
        double sigma2 = Math.Max(general.Where(double.IsFinite).Order().Take(Math.Max(1, (int)(0.9 * n))).Sum() / Math.Max(1, 2 * n - k), 1e-6);
        return [.. candidates.Select((m, c) => Gric(residuals[c], sigma2, n, ModelParameters.Count(m)))];
    }

    private static double Gric(double[] squared, double sigma2, int n, int k)
    {
        if (squared.Length == 0)
        {
            return double.PositiveInfinity;
        }
        const double r = 4, d = 2, lambda3 = 2;
        double sum = 0;
        foreach (double e2 in squared)
        {
            sum += double.IsFinite(e2) ? Math.Min(e2 / sigma2, lambda3 * (r - d)) : lambda3 * (r - d);
        }
        return sum + Math.Log(r) * d * n + Math.Log(r * n) * k;
    }

    /// <summary>
    /// The links with each usable transform refitted in <paramref name="model"/> to its tie points
    /// (least squares), so the spanning tree chains that model and not the pairs' more general one.
    /// </summary>
    public static List<AlignmentLink> Refit(IReadOnlyList<AlignmentLink> links, MotionModel model)
    {
        ArgumentNullException.ThrowIfNull(links);
        var refitted = new AlignmentLink[links.Count];
        Parallel.For(0, links.Count, i =>
        {
            var l = links[i];
            refitted[i] = l.TiePoints.Length >= 2 * ModelParameters.Count(model) && Fit(model, l.TiePoints) is { } t ? l with { AToB = t } : l;
        });
        return [.. refitted];
    }

    /// <summary>The family's least-squares fit of the transfer error (<see cref="MotionFamily.FitTransferError"/>).</summary>
    private static Transform2D? Fit(MotionModel model, Correspondence[] ties) =>
        MotionFamily.Of(model).FitTransferError(ties);

    private static string Name(MotionModel m) => MotionFamily.Of(m).Name;
}
