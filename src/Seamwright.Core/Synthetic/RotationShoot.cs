using Seamwright.Core.Cameras;
using Seamwright.Core.Imaging;

namespace Seamwright.Core.Synthetic;

/// <summary>
/// A shoot of a camera turning about its centre, rendered by <see cref="SphericalView"/> with exact
/// truth: each frame's rotation (camera to world), one focal length and one lens for every frame.
/// The four shoots of issue 10 (a full turn, two rows, a wide pan through a barrel lens, rows
/// with a zenith frame) at any frame size; the head wobbles a little in pitch and roll (seeded),
/// exposure varies and the sensor adds noise, as on a tripod head.
/// </summary>
public sealed record RotationShoot(string Name, int Width, int Height, double FocalPx, LensDistortion Lens, IReadOnlyList<Matrix3> Rotations, ulong Seed)
{
    /// <summary>Sensor noise, gray levels.</summary>
    public double NoiseSigma { get; init; } = 2.0;

    public int Count => Rotations.Count;

    /// <summary>Frame file name (JPEG).</summary>
    public string FileName(int frame) => $"frame_{frame + 1:00}.jpg";

    /// <summary>The camera of one frame.</summary>
    public SphericalView View(int frame) => new(Width, Height, FocalPx, Rotations[frame], Lens, SceneUnitsPerTangent: FocalPx);

    /// <summary>The pixels of one frame: the view (n x n samples per pixel), an exposure change and sensor noise.</summary>
    public GrayImage Render(int frame, int samplesPerAxis)
    {
        var scene = new ProceduralScene(Seed, SceneStyle.Courtyard);
        var pixels = View(frame).Render(scene, samplesPerAxis);
        double contrast = 1 + 0.04 * Math.Sin(1.7 * frame + Seed % 7);
        double brightness = 4 * Math.Cos(2.3 * frame + Seed % 5);
        return ImageEffects.AddGaussianNoise(ImageEffects.AdjustBrightnessContrast(pixels, contrast, brightness), NoiseSigma, Seed * 1000 + (ulong)frame);
    }

    /// <summary>One full turn in one row: 15 frames 24 degrees apart, 65 degree horizontal field of view.</summary>
    public static RotationShoot FullTurn(int width, int height) =>
        Make("full-turn", width, height, 65, default, [.. Enumerable.Range(0, 15).Select(k => (24.0 * k, 0.0))], 1001);

    /// <summary>Two rows of 12 at -15 and +15 degrees pitch, the upper row offset by half a step, 65 degree field of view.</summary>
    public static RotationShoot TwoRows(int width, int height) =>
        Make("two-rows", width, height, 65, default,
            [.. Enumerable.Range(0, 12).Select(k => (30.0 * k, -15.0)), .. Enumerable.Range(0, 12).Select(k => (30.0 * k + 15, 15.0))], 1002);

    /// <summary>A 150 degree pan (11 frames 15 degrees apart) through a barrel lens, k1 = -0.1, 65 degree field of view.</summary>
    public static RotationShoot BarrelPan(int width, int height) =>
        Make("barrel-pan", width, height, 65, new LensDistortion(-0.1, 0), [.. Enumerable.Range(0, 11).Select(k => (-75 + 15.0 * k, 0.0))], 1003);

    /// <summary>Eight frames at the horizon, six at +50 degrees and one looking straight up, 80 degree field of view.</summary>
    public static RotationShoot Zenith(int width, int height) =>
        Make("zenith", width, height, 80, default,
            [.. Enumerable.Range(0, 8).Select(k => (45.0 * k, 0.0)), .. Enumerable.Range(0, 6).Select(k => (60.0 * k + 20, 50.0)), (0.0, 90.0)], 1004);

    /// <summary>The four shoots at one frame size.</summary>
    public static IReadOnlyList<RotationShoot> All(int width, int height) =>
        [FullTurn(width, height), TwoRows(width, height), BarrelPan(width, height), Zenith(width, height)];

    private static RotationShoot Make(string name, int width, int height, double fovDeg, LensDistortion lens, (double Yaw, double Pitch)[] views, ulong seed)
    {
        double focal = (width / 2.0) / Math.Tan(fovDeg / 2 * Math.PI / 180);
        var rng = new SyntheticRandom(seed);
        const double degree = Math.PI / 180;
        // Wobble of the head: pitch and roll within about half a degree (fixed by the seed).
        var rotations = views.Select(v => Matrix3.FromYawPitchRoll(v.Yaw * degree,
            (v.Pitch + 0.5 * (rng.NextDouble() - 0.5)) * degree, 0.8 * (rng.NextDouble() - 0.5) * degree)).ToArray();
        return new RotationShoot(name, width, height, focal, lens, rotations, seed);
    }
}
