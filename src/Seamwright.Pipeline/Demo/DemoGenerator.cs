using Seamwright.Core.Cameras;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Output;

namespace Seamwright.Pipeline.Demo;

/// <summary>
/// Makes the demo folder: invented sets with known ground truth, rendered from the project's
/// own procedural scenes. Output is byte-identical on every run (fixed seeds, fixed jitter
/// tables, deterministic encoders).
/// <list type="bullet">
/// <item><c>estate-map-tiles</c>: the (fictional) Harrowmere County Archive scans a large
/// hand-drawn estate map in a 3 x 3 grid of overlapping tiles; each tile is slightly rotated and
/// scaled as the sheet shifts on the scanner bed, and exposure varies a little.</item>
/// <item><c>courtyard-pan</c>: five frames of a camera panning across a paved courtyard while
/// turning about its centre, so frame-to-frame motion is exactly K R K^-1.</item>
/// <item><c>lantern-gallery-turn</c>: the (fictional) Saltmarsh Point lighthouse trust records
/// the view from its lantern gallery with one full turn of a camera on a tripod head: twelve
/// frames 30 degrees apart with a little wobble of the head; the truth is each frame's rotation
/// and the focal length.</item>
/// </list>
/// </summary>
public static class DemoGenerator
{
    public const int ImageWidth = 800;
    public const int ImageHeight = 600;
    public const int JpegQuality = 90;
    private const int SamplesPerAxis = 2;

    public static IReadOnlyList<DemoSet> Sets { get; } = [EstateMapTiles(), CourtyardPan(), LanternGalleryTurn()];

    /// <summary>
    /// Writes every set under <paramref name="root"/> (one folder per set, images and
    /// <see cref="DemoTruth.FileName"/>). <paramref name="includeImage"/> may restrict which images
    /// are rendered (by file name); the truth files are always complete.
    /// </summary>
    public static IReadOnlyList<string> Generate(string root, Func<string, bool>? includeImage = null)
    {
        ArgumentException.ThrowIfNullOrEmpty(root);
        var written = new List<string>();
        foreach (var set in Sets)
        {
            string folder = Path.Combine(root, set.Name);
            Directory.CreateDirectory(folder);
            foreach (var image in set.Images)
            {
                if (includeImage is not null && !includeImage(image.FileName))
                {
                    continue;
                }
                string path = Path.Combine(folder, image.FileName);
                ImageWriter.Write(path, Render(set, image), JpegQuality);
                written.Add(path);
            }
            string truthPath = Path.Combine(folder, DemoTruth.FileName);
            DemoTruth.From(set).Write(truthPath);
            written.Add(truthPath);
        }
        return written;
    }

    /// <summary>The pixels of one demo image (before file encoding).</summary>
    public static GrayImage Render(DemoSet set, DemoImage image)
    {
        ArgumentNullException.ThrowIfNull(set);
        ArgumentNullException.ThrowIfNull(image);
        var pixels = image.Camera is { } camera ? camera.Render(set.Scene, SamplesPerAxis) : SceneRenderer.Render(set.Scene, image.View, SamplesPerAxis);
        pixels = ImageEffects.AdjustBrightnessContrast(pixels, image.Contrast, image.Brightness);
        return ImageEffects.AddGaussianNoise(pixels, image.NoiseSigma, image.NoiseSeed);
    }

    private static DemoSet EstateMapTiles()
    {
        var scene = new ProceduralScene(seed: 18430611, SceneStyle.EstateMap);
        // Tile pitch leaves about 30 % overlap between neighbours.
        const double pitchX = 560;
        const double pitchY = 420;
        // Per tile: rotation (degrees), scale, shift x, shift y, contrast, brightness. Fixed, invented.
        double[,] jitter =
        {
            { 0.8, 1.012, 6, -4, 1.00, 2 },
            { -1.1, 0.991, -3, 7, 1.03, -3 },
            { 0.4, 1.004, 9, 2, 0.97, 4 },
            { -0.6, 0.995, -8, -6, 1.02, 0 },
            { 0.0, 1.000, 0, 0, 1.00, 0 },
            { 1.3, 1.018, 4, 9, 0.98, -2 },
            { 0.9, 0.988, -5, 3, 1.04, 3 },
            { -1.4, 1.009, 7, -8, 0.99, -4 },
            { 0.5, 0.983, -2, 5, 1.01, 1 },
        };
        var images = new List<DemoImage>();
        for (int r = 0; r < 3; r++)
        {
            for (int c = 0; c < 3; c++)
            {
                int k = r * 3 + c;
                double angle = jitter[k, 0] * Math.PI / 180;
                var placement = Transform2D.Translation(c * pitchX + jitter[k, 2], r * pitchY + jitter[k, 3])
                    * ViewTransforms.SimilarityAbout((ImageWidth - 1) / 2.0, (ImageHeight - 1) / 2.0, jitter[k, 1], angle);
                images.Add(new DemoImage($"tile_r{r + 1}_c{c + 1}.jpg", new SceneView(ImageWidth, ImageHeight, placement),
                    jitter[k, 4], jitter[k, 5], NoiseSigma: 2.0, NoiseSeed: 1000UL + (ulong)k));
            }
        }
        return new DemoSet("estate-map-tiles",
            "Harrowmere County Archive (fictional): a hand-drawn estate map scanned in a 3 x 3 grid of overlapping tiles.",
            scene, "tile_r2_c2.jpg", images);
    }

    private static DemoSet LanternGalleryTurn()
    {
        var scene = new ProceduralScene(seed: 18710904, SceneStyle.Courtyard);
        const int width = 480, height = 360;
        // 80 degree horizontal field of view: second neighbours (60 degrees apart) still share a quarter.
        double focal = (width / 2.0) / Math.Tan(40 * Math.PI / 180);
        // Per frame: pitch and roll wobble of the head (degrees), contrast, brightness. Fixed, invented.
        double[,] wobble =
        {
            { 0.0, 0.0, 1.00, 0 }, { 1.1, -0.4, 0.98, 3 }, { -0.7, 0.6, 1.02, -2 }, { 0.4, 0.9, 1.04, 4 },
            { -1.2, -0.3, 0.97, -3 }, { 0.8, -0.8, 1.01, 1 }, { -0.3, 0.5, 0.99, 2 }, { 1.4, 0.2, 1.03, -4 },
            { -0.9, -0.6, 0.96, 0 }, { 0.2, 0.7, 1.02, 3 }, { -0.5, -0.9, 1.00, -1 }, { 0.9, 0.3, 0.98, 2 },
        };
        var images = new List<DemoImage>();
        for (int i = 0; i < 12; i++)
        {
            var rotation = Matrix3.FromYawPitchRoll(30.0 * i * Math.PI / 180, wobble[i, 0] * Math.PI / 180, wobble[i, 1] * Math.PI / 180);
            var camera = new SphericalView(width, height, focal, rotation, LensDistortion.None, SceneUnitsPerTangent: focal);
            images.Add(new DemoImage($"turn_{i + 1:00}.jpg", new SceneView(width, height, Transform2D.Identity), wobble[i, 2], wobble[i, 3],
                NoiseSigma: 2.0, NoiseSeed: 3000UL + (ulong)i) { Camera = camera });
        }
        return new DemoSet("lantern-gallery-turn",
            "Saltmarsh Point lighthouse trust (fictional): one full turn of a camera on a tripod head in the lantern gallery, twelve frames.",
            scene, "turn_01.jpg", images);
    }

    private static DemoSet CourtyardPan()
    {
        var scene = new ProceduralScene(seed: 20260415, SceneStyle.Courtyard);
        const double focal = 700;
        double cx = (ImageWidth - 1) / 2.0;
        double cy = (ImageHeight - 1) / 2.0;
        // The scene lies on the middle frame's image plane, shifted so the frames show a fresh region.
        var referenceToScene = Transform2D.Translation(3000, -1200);
        // Per frame: yaw, pitch, roll (degrees) relative to the middle frame, contrast, brightness.
        double[,] poses =
        {
            { -20.0, 1.2, -0.8, 0.96, -5 },
            { -10.2, 0.4, 0.5, 1.00, -2 },
            { 0.0, 0.0, 0.0, 1.00, 0 },
            { 9.8, -0.7, -0.4, 1.03, 3 },
            { 19.7, -1.1, 0.9, 1.05, 6 },
        };
        var images = new List<DemoImage>();
        for (int i = 0; i < 5; i++)
        {
            var toReference = ViewTransforms.CameraRotation(focal, cx, cy,
                poses[i, 0] * Math.PI / 180, poses[i, 1] * Math.PI / 180, poses[i, 2] * Math.PI / 180);
            images.Add(new DemoImage($"frame_{i + 1:00}.jpg", new SceneView(ImageWidth, ImageHeight, referenceToScene * toReference),
                poses[i, 3], poses[i, 4], NoiseSigma: 2.5, NoiseSeed: 2000UL + (ulong)i));
        }
        return new DemoSet("courtyard-pan",
            "A camera turning about its centre across a paved courtyard (synthetic), five frames.",
            scene, "frame_03.jpg", images);
    }
}
