using System.Globalization;
using Seamwright.Core.Estimation;

namespace Seamwright.Host.Commands;

/// <summary>The estimation options shared by <c>estimate</c> and <c>pair</c>: --model, --threshold, --seed.</summary>
internal static class EstimationArguments
{
    /// <summary>Applies one of the shared options to <paramref name="options"/>; returns an error in words, or null.</summary>
    /// <param name="thresholdUnit">How the threshold's pixels are described in the error (e.g. "full-resolution pixels").</param>
    public static string? Apply(string option, string? value, string thresholdUnit, ref EstimationOptions options)
    {
        switch (option)
        {
            case "--model":
                if (!MotionFamily.TryParse(value, out var family))
                {
                    return $"--model expects {MotionFamily.NamesInWords()} (got '{value}')";
                }
                options = options with { Model = family.Model };
                return null;
            case "--threshold":
                if (!double.TryParse(value, NumberStyles.Float, CultureInfo.InvariantCulture, out double px) || !double.IsFinite(px) || px <= 0)
                {
                    return $"--threshold expects a positive number of {thresholdUnit} (got '{value}')";
                }
                options = options with { Threshold = px };
                return null;
            case "--seed":
                if (!ulong.TryParse(value, NumberStyles.None, CultureInfo.InvariantCulture, out ulong seed))
                {
                    return $"--seed expects a non-negative integer (got '{value}')";
                }
                options = options with { Seed = seed };
                return null;
            default:
                throw new ArgumentOutOfRangeException(nameof(option), option, "not a shared estimation option");
        }
    }
}
