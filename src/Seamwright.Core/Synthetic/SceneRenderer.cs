using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Synthetic;

/// <summary>
/// Renders views of a <see cref="ProceduralScene"/>. A view is an image whose pixel (u, v)
/// (centre at integers) shows the scene at <c>imageToScene(u, v)</c>; each pixel averages
/// <c>samplesPerAxis^2</c> samples spread evenly over its square footprint.
/// </summary>
public static class SceneRenderer
{
    public static GrayImage Render(ProceduralScene scene, int width, int height, in Transform2D imageToScene, int samplesPerAxis = 2)
    {
        ArgumentNullException.ThrowIfNull(scene);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(width);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(height);
        ArgumentOutOfRangeException.ThrowIfLessThan(samplesPerAxis, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(samplesPerAxis, 8);
        var image = new GrayImage(width, height);
        int n = samplesPerAxis;
        var offsets = new double[n];
        for (int k = 0; k < n; k++)
        {
            offsets[k] = (k + 0.5) / n - 0.5;
        }
        var h = imageToScene;
        var cache = new ProceduralScene.NeighbourhoodCache();
        for (int v = 0; v < height; v++)
        {
            Span<byte> row = image.Row(v);
            for (int u = 0; u < width; u++)
            {
                double sum = 0;
                int used = 0;
                foreach (double oy in offsets)
                {
                    foreach (double ox in offsets)
                    {
                        double px = u + ox;
                        double py = v + oy;
                        double w = h.M31 * px + h.M32 * py + h.M33;
                        if (w <= 0)
                        {
                            continue;
                        }
                        double sx = (h.M11 * px + h.M12 * py + h.M13) / w;
                        double sy = (h.M21 * px + h.M22 * py + h.M23) / w;
                        sum += scene.Evaluate(sx, sy, cache);
                        used++;
                    }
                }
                row[u] = used == 0 ? (byte)0 : AreaResampler.ToByte((float)(sum / used));
            }
        }
        return image;
    }

    /// <summary>Renders a <see cref="SceneView"/>.</summary>
    public static GrayImage Render(ProceduralScene scene, SceneView view, int samplesPerAxis = 2)
    {
        ArgumentNullException.ThrowIfNull(view);
        return Render(scene, view.Width, view.Height, view.ImageToScene, samplesPerAxis);
    }
}

/// <summary>A view of a scene: an image size and the transform from its pixels to scene units.</summary>
public sealed record SceneView(int Width, int Height, Transform2D ImageToScene)
{
    public ImageSize Size => new(Width, Height);

    /// <summary>The transform from <paramref name="from"/>'s pixels to <paramref name="to"/>'s pixels (ground truth of a pair).</summary>
    public static Transform2D Between(SceneView from, SceneView to)
    {
        ArgumentNullException.ThrowIfNull(from);
        ArgumentNullException.ThrowIfNull(to);
        return (to.ImageToScene.Inverse() * from.ImageToScene).Normalized();
    }
}
