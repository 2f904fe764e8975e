namespace Seamwright.Pipeline.Output;

/// <summary>Numbers as our JSON outputs carry them: JSON has no infinity or NaN, so those become null.</summary>
public static class OutputNumbers
{
    public static double? FiniteOrNull(double value) => double.IsFinite(value) ? value : null;

    /// <summary>A UTC time as written in our outputs: ISO 8601 to the millisecond with a Z ("2026-12-02T05:10:00.000Z").</summary>
    public static string UtcTime(DateTime utc) =>
        utc.ToUniversalTime().ToString("yyyy-MM-dd'T'HH:mm:ss.fff'Z'", System.Globalization.CultureInfo.InvariantCulture);
}
