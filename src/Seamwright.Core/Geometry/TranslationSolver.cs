namespace Seamwright.Core.Geometry;

/// <summary>Translation (2 degrees of freedom): the mean displacement, exact for one match.</summary>
public static class TranslationSolver
{
    public const int MinimalSampleSize = 1;

    /// <summary>Least-squares shift over the data (the minimal case is one match).</summary>
    public static bool TryFit(ReadOnlySpan<Correspondence> data, out Transform2D model)
    {
        model = default;
        if (data.Length < MinimalSampleSize)
        {
            return false;
        }
        double sx = 0, sy = 0;
        foreach (var m in data)
        {
            sx += m.X2 - m.X1;
            sy += m.Y2 - m.Y1;
        }
        model = Transform2D.Translation(sx / data.Length, sy / data.Length);
        return model.IsFinite;
    }
}
