using System.Text.Json;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Everything one run reads from the settings, resolved once when the run begins: the profile,
/// the decode limits, the job parallelism and the fingerprint computed from exactly these values.
/// The profile and limits are private deep copies, so a settings reload (which replaces the
/// options the context holds) or any later edit of the live objects cannot reach a running set;
/// the fingerprint recorded in its outputs always describes the values it was made with.
/// </summary>
public sealed record RunPlan
{
    public required string ProfileName { get; init; }
    public required ProfileSettings Profile { get; init; }
    public required LimitSettings Limits { get; init; }
    /// <summary>Images decoded or pairs estimated at once within this run (the process-wide slots still bound all runs).</summary>
    public required int MaxParallelJobs { get; init; }
    /// <summary>Megabytes of features held in memory for the pairs of this run (<c>Service:FeatureMemoryMegabytes</c>).</summary>
    public required int FeatureMemoryMegabytes { get; init; }
    public required string Fingerprint { get; init; }

    public static RunPlan Resolve(SeamwrightOptions options, string profileName, string engineName, int algorithmVersion)
    {
        ArgumentNullException.ThrowIfNull(options);
        var profile = Copy(options.Profile(profileName));
        var limits = Copy(options.Limits);
        return new RunPlan
        {
            ProfileName = profileName,
            Profile = profile,
            Limits = limits,
            MaxParallelJobs = options.Service.MaxParallelJobs,
            FeatureMemoryMegabytes = options.Service.FeatureMemoryMegabytes,
            Fingerprint = SettingsFingerprint.ForSet(profile, limits, engineName, algorithmVersion),
        };
    }

    /// <summary>
    /// The settings fingerprint a run of this profile would record under these settings (the one
    /// formula: <see cref="Resolve"/> and the up-to-date check both use it).
    /// </summary>
    public static string FingerprintOf(SeamwrightOptions options, string profileName, string engineName, int algorithmVersion)
    {
        ArgumentNullException.ThrowIfNull(options);
        return SettingsFingerprint.ForSet(options.Profile(profileName), options.Limits, engineName, algorithmVersion);
    }

    private static T Copy<T>(T value) => JsonSerializer.Deserialize<T>(JsonSerializer.SerializeToUtf8Bytes(value))!;
}
