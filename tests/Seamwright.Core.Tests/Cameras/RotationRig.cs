using Seamwright.Core.Alignment;
using Seamwright.Core.Cameras;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Cameras;

/// <summary>
/// A rotating camera with known truth: rotations from yaw/pitch (degrees), one focal length and
/// lens, and tie points for every pair that overlaps, made by carrying a grid of points of one
/// image through the true rays into the other (plus Gaussian noise). The links' homographies are
/// least-squares fits to the tie points, as the pair stage would hand them over.
/// </summary>
internal sealed class RotationRig
{
    public RotationRig(int width, int height, double fovDeg, (double Yaw, double Pitch)[] views, LensDistortion lens = default, double rollDeg = 0)
    {
        Size = new ImageSize(width, height);
        Focal = (width / 2.0) / Math.Tan(fovDeg / 2 * Math.PI / 180);
        Lens = lens;
        Rotations = [.. views.Select(v => Matrix3.FromYawPitchRoll(v.Yaw * Math.PI / 180, v.Pitch * Math.PI / 180, rollDeg * Math.PI / 180))];
    }

    public ImageSize Size { get; }

    public double Focal { get; }

    public LensDistortion Lens { get; }

    public Matrix3[] Rotations { get; }

    public int Count => Rotations.Length;

    public ImageSize[] Sizes => [.. Enumerable.Repeat(Size, Count)];

    public int[] OneCamera => new int[Count];

    public static RotationRig FullTurn() => new(640, 480, 65, [.. Enumerable.Range(0, 15).Select(k => (24.0 * k, 0.0))]);

    public static RotationRig TwoRows() => new(640, 480, 65,
        [.. Enumerable.Range(0, 12).Select(k => (30.0 * k, -15.0)), .. Enumerable.Range(0, 12).Select(k => (30.0 * k + 15, 15.0))]);

    public static RotationRig BarrelPan() => new(640, 480, 65, [.. Enumerable.Range(0, 11).Select(k => (-75 + 15.0 * k, 0.0))], new LensDistortion(-0.1, 0));

    /// <summary>A row of eight at the horizon, a ring of six at +50 degrees and one frame looking straight up.</summary>
    public static RotationRig WithZenith() => new(640, 480, 80,
        [.. Enumerable.Range(0, 8).Select(k => (45.0 * k, 0.0)), .. Enumerable.Range(0, 6).Select(k => (60.0 * k + 20, 50.0)), (0.0, 90.0)]);

    public (double U, double V)? Project(int image, double wx, double wy, double wz)
    {
        var (x, y, z) = Rotations[image].Transpose().Apply(wx, wy, wz);
        if (z <= 1e-3)
        {
            return null;
        }
        double r2 = (x * x + y * y) / (z * z);
        if (Lens.K1 < 0 && r2 >= 0.9 / (-3 * Lens.K1))
        {
            // Past the radius where barrel distortion turns back: not a point the lens shows.
            return null;
        }
        var (dx, dy) = Lens.Distort(x / z, y / z);
        double u = Focal * dx + (Size.Width - 1) / 2.0, v = Focal * dy + (Size.Height - 1) / 2.0;
        return u >= 0 && v >= 0 && u <= Size.Width - 1 && v <= Size.Height - 1 ? (u, v) : null;
    }

    public (double X, double Y, double Z) Ray(int image, double u, double v)
    {
        var (x, y) = Lens.Undistort((u - (Size.Width - 1) / 2.0) / Focal, (v - (Size.Height - 1) / 2.0) / Focal);
        return Rotations[image].Apply(x, y, 1);
    }

    /// <summary>Links between every two images sharing at least <paramref name="minTies"/> grid points.</summary>
    public List<AlignmentLink> Links(double noisePx, ulong seed, int minTies = 20, int grid = 16)
    {
        var rng = new SyntheticRandom(seed);
        var links = new List<AlignmentLink>();
        for (int a = 0; a < Count; a++)
        {
            for (int b = a + 1; b < Count; b++)
            {
                var ties = new List<Correspondence>();
                for (int gy = 0; gy < grid; gy++)
                {
                    for (int gx = 0; gx < grid; gx++)
                    {
                        double u = (gx + 0.5 + 0.4 * (rng.NextDouble() - 0.5)) * (Size.Width - 1) / grid;
                        double v = (gy + 0.5 + 0.4 * (rng.NextDouble() - 0.5)) * (Size.Height - 1) / grid;
                        var (wx, wy, wz) = Ray(a, u, v);
                        if (Project(b, wx, wy, wz) is { } q)
                        {
                            ties.Add(new Correspondence(u + noisePx * rng.NextGaussian(), v + noisePx * rng.NextGaussian(),
                                q.U + noisePx * rng.NextGaussian(), q.V + noisePx * rng.NextGaussian()));
                        }
                    }
                }
                if (ties.Count >= minTies && HomographySolver.TryLeastSquares([.. ties], out var h))
                {
                    links.Add(new AlignmentLink(a, b, h, [.. ties], PairStatus.Accepted, ties.Count));
                }
            }
        }
        return links;
    }

    /// <summary>Relative rotation errors (degrees) between every two placed frames against the truth.</summary>
    public double[] RelativeErrorsDeg(RotationSetSolution solution)
    {
        var errors = new List<double>();
        for (int i = 0; i < Count; i++)
        {
            for (int j = i + 1; j < Count; j++)
            {
                if (solution.Poses[i] is { } pi && solution.Poses[j] is { } pj)
                {
                    var estimated = pi.Rotation.Transpose() * pj.Rotation;
                    var truth = Rotations[i].Transpose() * Rotations[j];
                    errors.Add(Matrix3.AngleBetween(estimated, truth) * 180 / Math.PI);
                }
            }
        }
        return [.. errors];
    }
}
