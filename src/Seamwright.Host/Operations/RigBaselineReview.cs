using System.Text.Json;
using Microsoft.Extensions.Logging;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Operations;

/// <summary>
/// The rig baseline check of `Frames` sets for one output root, one <see cref="RigBaseline"/> per
/// profile (rebuilt, and learning restarted, when the profile's rig settings change on a reload).
/// A camera is the folder of an image within the watched root (the key's part before its last
/// '/'; "" for the root itself), so a rig laid out as one folder per camera with the same frame
/// names works as is. A deviation is logged as a warning; the pipeline adds the reason to the
/// pair and marks it weak.
/// </summary>
internal sealed class RigBaselineReview(ILogger log) : IPairReview
{
    private readonly Dictionary<string, (string Settings, RigBaseline Baseline)> _byProfile = new(StringComparer.Ordinal);

    public static string CameraOf(string imageKey)
    {
        ArgumentNullException.ThrowIfNull(imageKey);
        int slash = imageKey.LastIndexOf('/');
        return slash < 0 ? "" : imageKey[..slash];
    }

    public string? ReviewAccepted(string profileName, ProfileSettings profile, string setId, string imageA, string imageB, Transform2D aToB, ImageSize sizeA)
    {
        ArgumentNullException.ThrowIfNull(profile);
        string? reason = BaselineOf(profileName, profile).Check(CameraOf(imageA), CameraOf(imageB), aToB, sizeA);
        if (reason is null)
        {
            return null;
        }
        log.LogWarning("Set {Set}: pair {ImageA} / {ImageB} marked weak: {Reason}", setId, imageA, imageB, reason);
        return reason;
    }

    private RigBaseline BaselineOf(string profileName, ProfileSettings profile)
    {
        string settings = JsonSerializer.Serialize(new { profile.RigBaselines, profile.RigLearnFromFirst, profile.RigTolerancePx });
        lock (_byProfile)
        {
            if (_byProfile.TryGetValue(profileName, out var known) && known.Settings == settings)
            {
                return known.Baseline;
            }
            var baseline = new RigBaseline(profile.RigLearnFromFirst, profile.RigTolerancePx);
            foreach (var b in profile.RigBaselines)
            {
                baseline.Configure(b.CameraA, b.CameraB, Transform2D.FromRowMajor(b.Transform));
            }
            _byProfile[profileName] = (settings, baseline);
            return baseline;
        }
    }
}
