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
public sealed record DemoImage(string FileName, SceneView View, double Contrast, double Brightness, double NoiseSigma, ulong NoiseSeed);

/// <summary>A demo set: a folder of overlapping images of one scene, with a named reference image.</summary>
public sealed record DemoSet(string Name, string Description, ProceduralScene Scene, string Reference, IReadOnlyList<DemoImage> Images)
{
    /// <summary>The true transform from an image's full-resolution pixels to the reference image's pixels.</summary>
    public Transform2D ToReference(DemoImage image)
    {
        ArgumentNullException.ThrowIfNull(image);
        var reference = Images.Single(i => i.FileName == Reference);
        return SceneView.Between(image.View, reference.View);
    }
}
