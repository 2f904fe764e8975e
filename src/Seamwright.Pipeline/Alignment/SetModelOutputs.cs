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

/// <summary>
/// Cameras of a set: images of the same size and the same EXIF make and model share one. Its
/// focal length from EXIF (<see cref="ExifCamera"/>), the median over its images that give one,
/// starts the rotation model (refined by the bundle); null where no image of it gives one.
/// </summary>
/// <param name="CameraOf">Per image, its camera.</param>
/// <param name="FocalPx">Per camera, the focal length from EXIF in pixels, or null.</param>
public sealed record SetCameras(int[] CameraOf, double?[] FocalPx)
{
    /// <summary>Cameras by size alone, no focal length known.</summary>
    public static SetCameras Of(IReadOnlyList<ImageSize> sizes)
    {
        ArgumentNullException.ThrowIfNull(sizes);
        return From(sizes, [.. sizes.Select(_ => ExifCamera.None)]);
    }

    public static SetCameras From(IReadOnlyList<ImageSize> sizes, IReadOnlyList<ExifCamera> exif)
    {
        ArgumentNullException.ThrowIfNull(sizes);
        ArgumentNullException.ThrowIfNull(exif);
        var ids = new Dictionary<(ImageSize, string), int>();
        var cameraOf = new int[sizes.Count];
        for (int i = 0; i < sizes.Count; i++)
        {
            var key = (sizes[i], exif[i].Camera);
            cameraOf[i] = ids.TryGetValue(key, out int id) ? id : ids[key] = ids.Count;
        }
        var focal = new double?[ids.Count];
        for (int c = 0; c < focal.Length; c++)
        {
            var given = Enumerable.Range(0, sizes.Count).Where(i => cameraOf[i] == c && exif[i].FocalPx is not null)
                .Select(i => exif[i].FocalPx!.Value).Order().ToArray();
            focal[c] = given.Length == 0 ? null : given.Length % 2 == 1 ? given[given.Length / 2] : 0.5 * (given[given.Length / 2 - 1] + given[given.Length / 2]);
        }
        return new SetCameras(cameraOf, focal);
    }

    /// <summary>Reads each image's EXIF (header only).</summary>
    public static SetCameras Read(IReadOnlyList<string> paths, IReadOnlyList<ImageSize> sizes)
    {
        ArgumentNullException.ThrowIfNull(paths);
        ArgumentNullException.ThrowIfNull(sizes);
        return From(sizes, [.. paths.Select((p, i) => ExifCamera.Read(p, sizes[i]))]);
    }
}
