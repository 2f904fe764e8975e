using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using System.Text.Json.Serialization;

namespace Seamwright.Pipeline.Settings;

/// <summary>
/// Short stable digests of the settings that shape results. A set is redone when its fingerprint
/// changes; completion and service settings are excluded because they do not change any output.
/// The tool version is recorded in outputs but never fingerprinted: only the algorithm version
/// (bumped when results change) is.
/// </summary>
public static class SettingsFingerprint
{
    private static readonly JsonSerializerOptions Canonical = new()
    {
        WriteIndented = false,
        Converters = { new JsonStringEnumConverter() },
    };

    /// <summary>Fingerprint of everything that shapes a set's outputs.</summary>
    public static string ForSet(ProfileSettings profile, LimitSettings limits, string engine, int algorithmVersion)
    {
        ArgumentNullException.ThrowIfNull(profile);
        var shape = new
        {
            algorithm = algorithmVersion,
            engine,
            pairing = profile.Pairing,
            features = FeaturesShape(profile.Features),
            estimation = profile.Estimation,
            alignment = profile.Alignment,
            extensions = profile.EffectiveExtensions.Select(e => e.ToLowerInvariant()).Order(StringComparer.Ordinal).ToArray(),
            limits,
        };
        string canonical = JsonSerializer.Serialize(shape, Canonical);
        if (profile.Pairing.Mode == PairingMode.Frames)
        {
            // Only `Frames` sets are checked against a rig baseline; other profiles keep their fingerprints.
            canonical += JsonSerializer.Serialize(new { rigBaselines = profile.RigBaselines, rigLearnFromFirst = profile.RigLearnFromFirst, rigTolerancePx = profile.RigTolerancePx }, Canonical);
        }
        return Digest(canonical);
    }

    /// <summary>Fingerprint of what shapes one image's features (the key of the feature cache with the image hash).</summary>
    public static string ForFeatures(FeatureSettings features, string engine, string descriptorVersion) =>
        Digest(JsonSerializer.Serialize(new { engine, descriptorVersion, features = FeaturesShape(features) }, Canonical));

    /// <summary>
    /// Fingerprint of what shapes one pair's outcome once both images' features exist (the key of
    /// the pair-result cache with the two images): the feature fingerprint, every estimation
    /// setting and the algorithm version. Alignment and output settings are not part of it, so a
    /// change there reuses every pair.
    /// </summary>
    public static string ForPair(string featureFingerprint, EstimationSettings estimation, int algorithmVersion) =>
        Digest(JsonSerializer.Serialize(new { featureFingerprint, estimation, algorithm = algorithmVersion }, Canonical));

    /// <summary>
    /// The feature settings as fingerprinted. The analysis size keeps the key it had before its
    /// setting was renamed, so a fingerprint recorded then (ledger, feature and pair caches) stays
    /// valid for the same value. Every property of <see cref="FeatureSettings"/> must appear here
    /// (SettingsFingerprintStabilityTests checks it).
    /// </summary>
    internal static object FeaturesShape(FeatureSettings f) => new
    {
        WorkingMegapixels = f.AnalysisMegapixels,
        f.MaxKeypoints,
        f.Masks,
    };

    public static string Digest(string canonical)
    {
        byte[] hash = SHA256.HashData(Encoding.UTF8.GetBytes(canonical));
        return Convert.ToHexStringLower(hash.AsSpan(0, 8));
    }
}
