using Seamwright.Core.Estimation;
namespace Seamwright.Core.Features;

/// <summary>
/// Procedural training images for the descriptor pattern: multi-octave value noise overlaid with
/// random hard-edged shapes (rectangles, discs, ellipses, strokes) at random contrast, plus mild
/// noise. Part of the pattern's definition: changing anything here changes the pattern, which
/// then needs a new version string.
/// </summary>
internal static class PatternTrainingImages
{
    public static byte[] Generate(ref SplitMix64Stream rng, int size)
    {
        var f = new double[size * size];
        AddValueNoise(ref rng, f, size);
        int shapes = 8 + rng.NextInt(24);
        for (int s = 0; s < shapes; s++)
        {
            AddShape(ref rng, f, size);
        }
        double contrast = 0.4 + 0.6 * rng.NextDouble(), offset = 128 + (rng.NextDouble() - 0.5) * 80;
        var img = new byte[size * size];
        for (int i = 0; i < f.Length; i++)
        {
            double noise = (rng.NextDouble() + rng.NextDouble() + rng.NextDouble() - 1.5) * 4;
            img[i] = (byte)Math.Clamp((int)Math.Round(offset + contrast * (f[i] - 128) + noise), 0, 255);
        }
        return img;
    }

    private static void AddValueNoise(ref SplitMix64Stream rng, double[] f, int size)
    {
        double amplitude = 90;
        for (int cell = 32; cell >= 4; cell /= 2, amplitude *= 0.55)
        {
            int n = size / cell + 2;
            var lattice = new double[n * n];
            for (int i = 0; i < lattice.Length; i++)
            {
                lattice[i] = (rng.NextDouble() - 0.5) * 2 * amplitude;
            }
            for (int y = 0; y < size; y++)
            {
                double gy = (double)y / cell;
                int iy = (int)gy;
                double ty = Smooth(gy - iy);
                for (int x = 0; x < size; x++)
                {
                    double gx = (double)x / cell;
                    int ix = (int)gx;
                    double tx = Smooth(gx - ix);
                    double a = lattice[iy * n + ix], b = lattice[iy * n + ix + 1];
                    double c = lattice[(iy + 1) * n + ix], d = lattice[(iy + 1) * n + ix + 1];
                    f[y * size + x] += (a + (b - a) * tx) * (1 - ty) + (c + (d - c) * tx) * ty;
                }
            }
        }
        for (int i = 0; i < f.Length; i++)
        {
            f[i] += 128;
        }
    }

    private static double Smooth(double t) => t * t * (3 - 2 * t);

    private static void AddShape(ref SplitMix64Stream rng, double[] f, int size)
    {
        int kind = rng.NextInt(4);
        double cx = rng.NextDouble() * size, cy = rng.NextDouble() * size;
        double a = 3 + rng.NextDouble() * size / 4, b = 3 + rng.NextDouble() * size / 4;
        double angle = rng.NextDouble() * Math.PI;
        double value = rng.NextDouble() * 255;
        double c = Math.Cos(angle), s = Math.Sin(angle);
        double thickness = 1 + rng.NextDouble() * 3;
        for (int y = 0; y < size; y++)
        {
            for (int x = 0; x < size; x++)
            {
                double u = c * (x - cx) + s * (y - cy), v = -s * (x - cx) + c * (y - cy);
                bool inside = kind switch
                {
                    0 => Math.Abs(u) <= a && Math.Abs(v) <= b,
                    1 => u * u + v * v <= a * a,
                    2 => (u * u) / (a * a) + (v * v) / (b * b) <= 1,
                    _ => Math.Abs(v) <= thickness && Math.Abs(u) <= a * 2,
                };
                if (inside)
                {
                    f[y * size + x] = value;
                }
            }
        }
    }
}
