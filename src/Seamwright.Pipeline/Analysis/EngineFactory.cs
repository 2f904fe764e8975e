namespace Seamwright.Pipeline.Analysis;

/// <summary>Creates the configured pair engine.</summary>
public static class EngineFactory
{
    public static readonly string[] Names = ["features", ChecksumEngine.EngineName];

    public static IPairEngine Create(string name) => name switch
    {
        ChecksumEngine.EngineName => new ChecksumEngine(),
        "features" => new FeaturesEngine(),
        _ => throw new ArgumentOutOfRangeException(nameof(name), name, "unknown engine; allowed: " + string.Join(", ", Names)),
    };
}
