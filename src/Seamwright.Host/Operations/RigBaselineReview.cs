using Microsoft.Extensions.Logging;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Processing;

namespace Seamwright.Host.Operations;

/// <summary>One configured rig baseline: camera A to camera B as a 3x3 row-major transform (9 numbers).</summary>
public sealed class RigBaselineSetting
{
    public string CameraA { get; init; } = "";
    public string CameraB { get; init; } = "";
    public double[] Transform { get; init; } = [];
}

/// <summary>
/// The rig baseline check of `frames` sets for one output root. A camera is the folder of an
/// image within the watched root (the key's part before its last '/'; "" for the root itself),
/// so a rig laid out as one folder per camera with the same frame names works as is. A
/// deviation is logged as a warning; the pipeline adds the reason to the pair and marks it weak.
/// </summary>
internal sealed class RigBaselineReview : IPairReview
{
    private readonly RigBaseline _baseline;
    private readonly ILogger _log;

    public RigBaselineReview(OperationsOptions options, ILogger log)
    {
        ArgumentNullException.ThrowIfNull(options);
        _log = log;
        _baseline = new RigBaseline(options.RigLearnFromFirst, options.RigTolerancePixels);
        foreach (var b in options.RigBaselines)
        {
            _baseline.Configure(b.CameraA, b.CameraB, Transform2D.FromRowMajor(b.Transform));
        }
    }

    public static string CameraOf(string imageKey)
    {
        ArgumentNullException.ThrowIfNull(imageKey);
        int slash = imageKey.LastIndexOf('/');
        return slash < 0 ? "" : imageKey[..slash];
    }

    public string? ReviewAccepted(string setId, string imageA, string imageB, Transform2D aToB, ImageSize sizeA)
    {
        string reason = _baseline.Check(CameraOf(imageA), CameraOf(imageB), aToB, sizeA) ?? "";
        if (reason.Length == 0)
        {
            return null;
        }
        _log.LogWarning("Set {Set}: pair {ImageA} / {ImageB} marked weak: {Reason}", setId, imageA, imageB, reason);
        return reason;
    }
}
