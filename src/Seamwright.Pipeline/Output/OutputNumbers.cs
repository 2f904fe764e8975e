namespace Seamwright.Pipeline.Output;

/// <summary>Numbers as our JSON outputs carry them: JSON has no infinity or NaN, so those become null.</summary>
public static class OutputNumbers
{
    public static double? FiniteOrNull(double value) => double.IsFinite(value) ? value : null;
}
