using System.Globalization;
using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>Which set model aligns a set.</summary>
public enum SetModelKind
{
    /// <summary>Rotation when the set is a rotating camera's and that model is warranted; else the lowest-freedom planar model (default).</summary>
    Auto,

    /// <summary>Planar, in the pairs' estimation model (the behaviour before the automatic choice).</summary>
    Planar,

    /// <summary>Camera rotation whenever it can be solved.</summary>
    Rotation,
}

/// <summary>The aligned set with the model used and why.</summary>
/// <param name="Alignment">Placements as plane transforms into the reference image (for rotation sets, those that map into its plane).</param>
/// <param name="Model">"rotation" or the planar model's name.</param>
/// <param name="Reason">Why that model, in words.</param>
/// <param name="Planar">The planar model choice (null when the planar model was forced).</param>
/// <param name="Rotation">The rotation solution when the rotation model was chosen (null otherwise).</param>
/// <param name="Extent">Angular extent and suggested projection of a rotation set (null otherwise).</param>
/// <param name="OffPlane">Per image, why a placed camera has no transform into the reference plane (null otherwise).</param>
public sealed record SetModelResult(SetAlignment Alignment, string Model, string Reason, PlanarModelChoice? Planar,
    RotationSetSolution? Rotation, AngularExtent? Extent, string?[] OffPlane)
{
    public bool IsRotation => Rotation is not null;
}

/// <summary>
/// Chooses the set model and aligns the set in it. Planar first, in the model chosen by
/// <see cref="PlanarModelChoice"/> (or the estimation model when forced). Rotation is tried when
/// forced, or when the pairwise homographies agree on a focal length (Szeliski and Shum 1997;
/// a plane seen from moving positions gives none or scattered ones). It is chosen when it places
/// more images, when the set spans more than <see cref="WideDegrees"/> degrees, or when it explains
/// the tie points as well (RMS within 10 % plus 0.05 px) with fewer parameters.
/// </summary>
public static class SetModelSelector
{
    /// <summary>Extent beyond which one plane cannot hold the set well (rotation chosen), degrees (judgement).</summary>
    public const double WideDegrees = 100;

    /// <summary>Largest interquartile spread of the pairwise focal estimates, relative to their median, that counts as agreement (judgement).</summary>
    public const double FocalAgreement = 0.25;

    public static SetModelResult Align(IReadOnlyList<ImageSize> sizes, IReadOnlyList<int> cameraOf, IReadOnlyList<AlignmentLink> links,
        MotionModel estimationModel, SetModelKind kind, AlignmentOptions? planarOptions = null, RotationSetOptions? rotationOptions = null,
        IReadOnlyList<double?>? givenFocal = null)
    {
        ArgumentNullException.ThrowIfNull(sizes);
        ArgumentNullException.ThrowIfNull(links);
        planarOptions ??= new AlignmentOptions();
        rotationOptions ??= new RotationSetOptions();
        var usable = links.Where(l => l.Status == PairStatus.Accepted || (planarOptions.IncludeWeakLinks && l.Status == PairStatus.Weak)).ToList();
        var none = new string?[sizes.Count];
        if (kind == SetModelKind.Planar)
        {
            var forced = SetAligner.Align(sizes, links, estimationModel, planarOptions);
            return new SetModelResult(forced, Name(estimationModel), "planar model set by the profile (the pairs' estimation model)", null, null, null, none);
        }
        var choice = PlanarModelChoice.Choose(usable, estimationModel);
        var planar = SetAligner.Align(sizes, !MotionFamily.Of(estimationModel).IsSpecialCaseOf(MotionFamily.Of(choice.Model)) ? PlanarModelChoice.Refit(links, choice.Model) : links, choice.Model, planarOptions);
        string? evidence = kind == SetModelKind.Rotation ? "rotation model set by the profile" : RotationEvidence(usable, sizes);
        if (evidence is null)
        {
            return new SetModelResult(planar, Name(choice.Model), "the pairs give no consistent focal length (not a camera turning about its centre); " + choice.Reason,
                choice, null, null, none);
        }
        var rotation = RotationSetSolver.Solve(sizes, cameraOf, links, rotationOptions with { ReferenceImage = planarOptions.ReferenceImage },
            givenFocal, planarOptions.IncludeWeakLinks);
        var placedPoses = rotation.Poses.OfType<CameraPose>().ToList();
        if (placedPoses.Count < 2)
        {
            return new SetModelResult(planar, Name(choice.Model), "the rotation model could not place the set; " + choice.Reason, choice, null, null, none);
        }
        var extent = AngularExtent.Of(placedPoses, [.. placedPoses.Select(p => (sizes[p.Index].Width, sizes[p.Index].Height))]);
        string? why = kind == SetModelKind.Rotation ? evidence : Prefer(rotation, extent, planar, choice.Model, sizes.Count);
        if (why is null)
        {
            double planarRms = planar.Components.Length > 0 ? planar.Components[0].Residuals.JointRmsPx : double.NaN;
            return new SetModelResult(planar, Name(choice.Model), string.Create(CultureInfo.InvariantCulture,
                $"the rotation model fits worse (tie-point RMS {rotation.Residuals.RmsPx:0.###} px against {planarRms:0.###} px) and the set spans only {extent.HorizontalDeg:0.#} x {extent.VerticalDeg:0.#} degrees; {choice.Reason}"),
                choice, null, null, none);
        }
        var (alignment, offPlane) = RotationPlacement.ToSetAlignment(sizes, rotation);
        string lens = rotation.DistortionReason.Length > 0 ? "; " + rotation.DistortionReason : "";
        return new SetModelResult(alignment, "rotation", why + lens, choice, rotation, extent, offPlane);
    }

    /// <summary>Null when the pairs do not look like a rotating camera's; otherwise the evidence in words.</summary>
    private static string? RotationEvidence(List<AlignmentLink> links, IReadOnlyList<ImageSize> sizes)
    {
        if (links.Count == 0)
        {
            return null;
        }
        var focals = links.Select(l => FocalFromHomography.PairFocal(l.AToB, sizes[l.ImageA], sizes[l.ImageB]))
            .OfType<double>().Where(double.IsFinite).Order().ToArray();
        if (focals.Length < Math.Max(1, (links.Count + 1) / 2))
        {
            return null;
        }
        double median = focals[focals.Length / 2];
        double spread = (focals[3 * (focals.Length - 1) / 4] - focals[(focals.Length - 1) / 4]) / median;
        double diagonal = sizes.Average(s => Math.Sqrt((double)s.Width * s.Width + (double)s.Height * s.Height));
        if (!(spread <= FocalAgreement) || median > 20 * diagonal)
        {
            return null;
        }
        return string.Create(CultureInfo.InvariantCulture, $"{focals.Length} of {links.Count} pairs agree on a focal length near {median:0.#} px");
    }

    private static string? Prefer(RotationSetSolution rotation, AngularExtent extent, SetAlignment planar, MotionModel planarModel, int images)
    {
        if (rotation.PlacedCount > planar.PlacedCount)
        {
            return $"the rotation model places {rotation.PlacedCount} images, the planar model {planar.PlacedCount}";
        }
        if (extent.HorizontalDeg > WideDegrees || extent.VerticalDeg > WideDegrees)
        {
            return string.Create(CultureInfo.InvariantCulture, $"the set spans {extent.HorizontalDeg:0.#} x {extent.VerticalDeg:0.#} degrees, too wide for one plane");
        }
        double planarRms = planar.Components.Length > 0 ? planar.Components[0].Residuals.JointRmsPx : double.PositiveInfinity;
        int rotationParameters = 3 * (rotation.PlacedCount - 1) + rotation.Poses.OfType<CameraPose>().Select(p => p.FocalPx).Distinct().Count();
        int planarParameters = ModelParameters.Count(planarModel) * (planar.PlacedCount - 1);
        if (rotationParameters < planarParameters && rotation.Residuals.RmsPx <= 1.1 * planarRms + 0.05)
        {
            return string.Create(CultureInfo.InvariantCulture,
                $"the rotation model explains the tie points as well (RMS {rotation.Residuals.RmsPx:0.###} px against {planarRms:0.###} px) with fewer parameters ({rotationParameters} against {planarParameters})");
        }
        return null;
    }

    private static string Name(MotionModel m) => MotionFamily.Of(m).Name;
}
