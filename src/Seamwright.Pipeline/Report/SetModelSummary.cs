using System.Globalization;
using Seamwright.Core.Cameras;

namespace Seamwright.Pipeline.Report;

/// <summary>Report facts and warnings of the set model (rotation sets: focal length, extent, projection, levelling).</summary>
public static class SetModelSummary
{
    /// <summary>Label of the fact naming the model the set was placed in.</summary>
    public const string SetModelLabel = "Set model";

    /// <summary>Label of the fact saying why that set model.</summary>
    public const string ReasonLabel = "Chosen because";

    public static IReadOnlyList<ReportFact> Facts(SetModelResult? model)
    {
        if (model is null)
        {
            return [];
        }
        var facts = new List<ReportFact> { new(SetModelLabel, model.Model), new(ReasonLabel, model.Reason, Prose: true) };
        if (model.Rotation is { } r && model.Extent is { } e)
        {
            var focals = r.Poses.OfType<CameraPose>().Select(p => p.FocalPx).Distinct().Order().ToArray();
            facts.Add(new("Focal length", string.Join(", ", focals.Select(f => F($"{f:0.##} px")))));
            facts.Add(new("Angular extent", F($"{e.HorizontalDeg:0.#} x {e.VerticalDeg:0.#} degrees (latitude {e.BottomDeg:0.#} to {e.TopDeg:0.#})")));
            facts.Add(new("Suggested projection", F($"{e.Projection.ToString().ToLowerInvariant()}, {e.CanvasWidth} x {e.CanvasHeight} px")));
            facts.Add(new("Levelling", F($"world turned by {r.LevellingDeg:0.##} degrees so the cameras' horizontal axes lie level"), Prose: true));
        }
        return facts;
    }

    /// <summary>
    /// The plane alignment's warnings, less those a rotation set answers: images that look away from
    /// the reference plane are placed by their camera, and not fitting one plane is expected.
    /// </summary>
    public static IReadOnlyList<string> Warnings(IReadOnlyList<string> planeWarnings, SetModelResult? model, IReadOnlyList<string> names)
    {
        ArgumentNullException.ThrowIfNull(planeWarnings);
        ArgumentNullException.ThrowIfNull(names);
        if (model?.Rotation is null)
        {
            return planeWarnings;
        }
        var offPlane = names.Where((_, i) => model.OffPlane[i] is not null).Select(n => n + " is not placed: ").ToArray();
        return [.. planeWarnings.Where(w => !w.StartsWith("The set does not fit one plane", StringComparison.Ordinal)
            && !offPlane.Any(p => w.StartsWith(p, StringComparison.Ordinal)))];
    }

    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);
}
