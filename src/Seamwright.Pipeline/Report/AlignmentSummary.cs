using System.Globalization;
using Seamwright.Core.Alignment;

namespace Seamwright.Pipeline.Report;

/// <summary>Turns a set alignment into report facts, warnings and per-pair notes.</summary>
public static class AlignmentSummary
{
    /// <param name="offPlane">Per image, why its camera block places it without a plane transform (null otherwise); null for planar sets.</param>
    public static IReadOnlyList<ReportFact> Facts(SetAlignment alignment, IReadOnlyList<string> names, IReadOnlyList<string?>? offPlane = null)
    {
        ArgumentNullException.ThrowIfNull(alignment);
        ArgumentNullException.ThrowIfNull(names);
        var facts = new List<ReportFact>
        {
            new("Reference image", alignment.Reference is int r ? names[r] : "none"),
            new("Placed images", PlacedText(alignment, offPlane)),
            new("Components", alignment.Components.Length.ToString(CultureInfo.InvariantCulture)),
        };
        if (alignment.Canvas is CanvasBounds c)
        {
            facts.Add(new("Canvas (reference px)", F($"{c.Width:0} x {c.Height:0} from ({c.MinX:0}, {c.MinY:0})")));
        }
        if (alignment.Components.Length > 0)
        {
            var res = alignment.Components[0].Residuals;
            facts.Add(new("Tie points", res.TiePoints.ToString(CultureInfo.InvariantCulture)));
            facts.Add(new("Residual RMS, spanning tree", F($"{res.TreeRmsPx:0.###} px")));
            facts.Add(new("Residual RMS, joint", F($"{res.JointRmsPx:0.###} px (median {res.JointMedianPx:0.###}, max {res.JointMaxPx:0.###})")));
            facts.Add(new("Refinement iterations", res.Iterations.ToString(CultureInfo.InvariantCulture)));
        }
        facts.Add(new("Links left out", alignment.Demoted.Length.ToString(CultureInfo.InvariantCulture)));
        // Judged only over placed images: with fewer than two placed, nothing was drawn on a plane.
        facts.Add(new("Fits one plane", alignment.PlacedCount < 2 ? "not judged (fewer than two images placed)" : alignment.NotPlanar ? "no" : "yes"));
        return facts;
    }

    public static IReadOnlyList<string> Warnings(SetAlignment alignment, IReadOnlyList<string> names)
    {
        ArgumentNullException.ThrowIfNull(alignment);
        ArgumentNullException.ThrowIfNull(names);
        var warnings = new List<string>();
        if (alignment.IsSplit)
        {
            warnings.Add(F($"The set splits into {alignment.Components.Length} groups, each aligned to its own reference: ")
                + string.Join("; ", alignment.Components.Select(c => $"{names[c.Reference]} ({c.Images.Length} images)")));
        }
        if (alignment.NotPlanar)
        {
            warnings.Add("The set does not fit one plane (a wide or all-round sequence?): images far from the reference are left unplaced; pairwise results stay valid.");
        }
        foreach (var p in alignment.Images.Where(p => !p.IsPlaced))
        {
            warnings.Add($"{names[p.Index]} is not placed: {p.Reason}");
        }
        foreach (var d in alignment.Demoted)
        {
            warnings.Add($"Link {names[d.ImageA]} - {names[d.ImageB]} left out ({d.Stage}): {d.Reason}");
        }
        return warnings;
    }

    /// <summary>The alignment's note on a pair (null when the link was not left out).</summary>
    public static string? PairNote(SetAlignment alignment, int imageA, int imageB)
    {
        ArgumentNullException.ThrowIfNull(alignment);
        var d = alignment.Demoted.FirstOrDefault(d => (d.ImageA == imageA && d.ImageB == imageB) || (d.ImageA == imageB && d.ImageB == imageA));
        return d is null ? null : $"left out of the alignment ({d.Stage}): {d.Reason}";
    }

    private static string PlacedText(SetAlignment alignment, IReadOnlyList<string?>? offPlane)
    {
        int byCamera = ReportVerdict.ByCameraOnly(alignment, offPlane);
        return byCamera == 0
            ? F($"{alignment.PlacedCount} of {alignment.Images.Length}")
            : F($"{alignment.PlacedCount + byCamera} of {alignment.Images.Length} ({alignment.PlacedCount} on the reference plane, {byCamera} by their camera only)");
    }

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
