using Seamwright.Core.Cameras;
using Seamwright.Core.Geometry;

namespace Seamwright.Pipeline.Alignment;

/// <summary>Lens distortion of a camera (Brown's polynomial; see README, "Camera block").</summary>
public sealed record SidecarDistortion(double K1, double K2);

/// <summary>
/// The sidecar's <c>camera</c> block of an image of a rotation set: focal length and principal
/// point in pixels, the rotation (3x3 row-major) taking a ray of this camera (x right, y down, z
/// forward; pixel (u, v) is ((u - cx) / f, (v - cy) / f, 1) after removing the distortion) into the
/// set's levelled world frame (y down, so up is -y), and the distortion.
/// </summary>
public sealed record SidecarCamera(double FocalPx, double[] PrincipalPoint, double[][] Rotation, SidecarDistortion Distortion)
{
    public static SidecarCamera From(CameraPose pose)
    {
        ArgumentNullException.ThrowIfNull(pose);
        var r = pose.Rotation;
        return new SidecarCamera(Round(pose.FocalPx), [Round(pose.Cx), Round(pose.Cy)],
            [[Round(r.M11), Round(r.M12), Round(r.M13)], [Round(r.M21), Round(r.M22), Round(r.M23)], [Round(r.M31), Round(r.M32), Round(r.M33)]],
            new SidecarDistortion(Round(pose.Distortion.K1), Round(pose.Distortion.K2)));
    }

    private static double Round(double v) => Math.Round(v, 9);
}

/// <summary>Angular extent of a rotation set, degrees (latitude up positive).</summary>
public sealed record ManifestExtent(double HorizontalDeg, double VerticalDeg, double BottomDeg, double TopDeg);

/// <summary>Suggested stitching projection and its canvas in pixels.</summary>
public sealed record ManifestProjection(string Name, int Width, int Height);

/// <summary>The manifest's record of the set model: which, why, and for rotation sets the focal lengths, extent, projection and levelling.</summary>
public sealed record ManifestSetModel
{
    /// <summary>"rotation" or a planar model (translation, similarity, affine, homography).</summary>
    public required string Model { get; init; }

    public required string Reason { get; init; }

    /// <summary>Focal length per placed camera in pixels (null for planar sets).</summary>
    public required double[]? FocalPx { get; init; }

    public required ManifestExtent? Extent { get; init; }

    public required ManifestProjection? Projection { get; init; }

    /// <summary>Angle the levelling turned the world, degrees (null for planar sets).</summary>
    public required double? LevellingDeg { get; init; }

    public static ManifestSetModel From(SetModelResult result)
    {
        ArgumentNullException.ThrowIfNull(result);
        var e = result.Extent;
        return new ManifestSetModel
        {
            Model = result.Model,
            Reason = result.Reason,
            FocalPx = result.Rotation?.Poses.OfType<CameraPose>().Select(p => Math.Round(p.FocalPx, 4)).Distinct().ToArray(),
            Extent = e is null ? null : new ManifestExtent(e.HorizontalDeg, e.VerticalDeg, e.BottomDeg, e.TopDeg),
            Projection = e is null ? null : new ManifestProjection(e.Projection.ToString().ToLowerInvariant(), e.CanvasWidth, e.CanvasHeight),
            LevellingDeg = result.Rotation is { } r ? Math.Round(r.LevellingDeg, 4) : null,
        };
    }
}

/// <summary>Cameras of a set: images of the same size share one (no make/model is read yet).</summary>
public static class SetCameras
{
    public static int[] Of(IReadOnlyList<ImageSize> sizes)
    {
        ArgumentNullException.ThrowIfNull(sizes);
        var ids = new Dictionary<ImageSize, int>();
        return [.. sizes.Select(s => ids.TryGetValue(s, out int id) ? id : ids[s] = ids.Count)];
    }
}
