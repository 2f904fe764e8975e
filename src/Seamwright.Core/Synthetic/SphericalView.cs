using Seamwright.Core.Cameras;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Synthetic;

/// <summary>
/// A view of a camera turning about its centre inside a scene wrapped round it, so a full turn
/// and frames looking up or down exist: the ray of each sample (pixel (u, v) is the ray
/// ((x, y, 1)), (x, y) the ideal point of the seen point ((u - cx) / f, (v - cy) / f) under the
/// lens distortion, turned by <see cref="Rotation"/> into the world) meets the unit cube; each of
/// the six faces shows its own region of the procedural scene, <see cref="SceneUnitsPerTangent"/>
/// scene units per unit of the face's tangent coordinates. Exact ground truth: the camera's
/// rotation, focal length and distortion.
/// </summary>
public sealed record SphericalView(int Width, int Height, double FocalPx, Matrix3 Rotation, LensDistortion Lens, double SceneUnitsPerTangent)
{
    /// <summary>Scene units between the regions shown on the cube's faces.</summary>
    public const double FaceSpacing = 100_000;

    public double Cx => (Width - 1) / 2.0;

    public double Cy => (Height - 1) / 2.0;

    /// <summary>The scene point a sample at (u, v) shows.</summary>
    public (double X, double Y) SceneAt(double u, double v)
    {
        var (x, y) = Lens.Undistort((u - Cx) / FocalPx, (v - Cy) / FocalPx);
        var (wx, wy, wz) = Rotation.Apply(x, y, 1);
        double ax = Math.Abs(wx), ay = Math.Abs(wy), az = Math.Abs(wz);
        int face;
        double s, t;
        if (az >= ax && az >= ay)
        {
            face = wz > 0 ? 0 : 1;
            (s, t) = (wx / az, wy / az);
        }
        else if (ax >= ay)
        {
            face = wx > 0 ? 2 : 3;
            (s, t) = (wz / ax, wy / ax);
        }
        else
        {
            face = wy > 0 ? 4 : 5;
            (s, t) = (wx / ay, wz / ay);
        }
        return (face * FaceSpacing + SceneUnitsPerTangent * s, SceneUnitsPerTangent * t);
    }

    /// <summary>Renders the view, averaging n x n samples per pixel footprint.</summary>
    public GrayImage Render(ProceduralScene scene, int samplesPerAxis = 2)
    {
        ArgumentNullException.ThrowIfNull(scene);
        ArgumentOutOfRangeException.ThrowIfLessThan(samplesPerAxis, 1);
        var image = new GrayImage(Width, Height);
        int n = samplesPerAxis;
        var cache = new ProceduralScene.NeighbourhoodCache();
        for (int v = 0; v < Height; v++)
        {
            Span<byte> row = image.Row(v);
            for (int u = 0; u < Width; u++)
            {
                double sum = 0;
                for (int j = 0; j < n; j++)
                {
                    for (int i = 0; i < n; i++)
                    {
                        var (sx, sy) = SceneAt(u + (i + 0.5) / n - 0.5, v + (j + 0.5) / n - 0.5);
                        sum += scene.Evaluate(sx, sy, cache);
                    }
                }
                row[u] = AreaResampler.ToByte((float)(sum / (n * n)));
            }
        }
        return image;
    }
}
