using Seamwright.Core.Cameras;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Pipeline.Demo;

/// <summary>One demo image: its file name, the view it shows, and the scanner or camera effects applied.</summary>
/// <param name="FileName">File name inside the set folder (.jpg or .png).</param>
/// <param name="View">Size and the transform from the image's pixels to scene units.</param>
/// <param name="Contrast">Contrast gain (exposure differences between shots).</param>
/// <param name="Brightness">Brightness offset in gray levels.</param>
/// <param name="NoiseSigma">Sensor noise, gray levels.</param>
/// <param name="NoiseSeed">Seed of the noise.</param>
public sealed record DemoImage(string FileName, SceneView View, double Contrast, double Brightness, double NoiseSigma, ulong NoiseSeed)
{
    /// <summary>For a camera turning about its centre in a scene wrapped round it: the camera (rendered instead of <see cref="View"/>).</summary>
    public SphericalView? Camera { get; init; }
}

/// <summary>A demo set: a folder of overlapping images of one scene, with a named reference image.</summary>
public sealed record DemoSet(string Name, string Description, ProceduralScene Scene, string Reference, IReadOnlyList<DemoImage> Images)
{
    /// <summary>The true transform from an image's full-resolution pixels to the reference image's pixels.</summary>
    public Transform2D ToReference(DemoImage image)
    {
        ArgumentNullException.ThrowIfNull(image);
        var reference = Images.Single(i => i.FileName == Reference);
        if (image.Camera is { } c && reference.Camera is { } r)
        {
            // K_r R_r^T R K^-1 (the demo's lenses have no distortion).
            var rel = r.Rotation.Transpose() * c.Rotation;
            var k = new Transform2D(r.FocalPx, 0, r.Cx, 0, r.FocalPx, r.Cy, 0, 0, 1);
            var kInv = new Transform2D(1 / c.FocalPx, 0, -c.Cx / c.FocalPx, 0, 1 / c.FocalPx, -c.Cy / c.FocalPx, 0, 0, 1);
            return (k * new Transform2D(rel.M11, rel.M12, rel.M13, rel.M21, rel.M22, rel.M23, rel.M31, rel.M32, rel.M33) * kInv).Normalized();
        }
        return SceneView.Between(image.View, reference.View);
    }

    /// <summary>True when the image maps into the reference image's plane (w &gt; 0 at its corners): always for planar sets.</summary>
    public bool MapsIntoReference(DemoImage image)
    {
        ArgumentNullException.ThrowIfNull(image);
        var reference = Images.Single(i => i.FileName == Reference);
        if (image.Camera is { } c && reference.Camera is { } r)
        {
            // The ideal ray of every corner in front of the reference camera.
            var rel = r.Rotation.Transpose() * c.Rotation;
            return Transform2D.Corners(c.Width, c.Height).All(p => rel.Apply((p.X - c.Cx) / c.FocalPx, (p.Y - c.Cy) / c.FocalPx, 1).Z > 1e-9);
        }
        return true;
    }
}
