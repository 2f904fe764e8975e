using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;

namespace Seamwright.Tests.Shared;

/// <summary>
/// Test scenes made by the project: a continuous procedural texture (hashed value noise at
/// several scales plus one hard-edged shape per grid cell) that can be rendered under any
/// transform with supersampling, so a warped view has no resampling artefacts; also blank and
/// periodic scenes. Test input only; the values are never results.
/// </summary>
internal sealed class SyntheticScenes(ulong seed)
{
    private const int Cell = 48;

    /// <summary>Renders the texture as seen through sceneToImage (maps texture coordinates to image pixels).</summary>
    public GrayImage Render(int width, int height, Transform2D sceneToImage, int supersample = 2, double gain = 1, double offset = 0,
        double noiseSigma = 0, ulong noiseSeed = 1)
    {
        var inv = sceneToImage.Inverse();
        var img = new GrayImage(width, height);
        double step = 1.0 / supersample;
        var noise = new Gaussian(noiseSeed);
        for (int y = 0; y < height; y++)
        {
            for (int x = 0; x < width; x++)
            {
                double sum = 0;
                for (int j = 0; j < supersample; j++)
                {
                    for (int i = 0; i < supersample; i++)
                    {
                        var (u, v) = inv.Apply(x - 0.5 + (i + 0.5) * step, y - 0.5 + (j + 0.5) * step);
                        sum += Value(u, v);
                    }
                }
                double value = gain * sum / (supersample * supersample) + offset + (noiseSigma > 0 ? noiseSigma * noise.Next() : 0);
                img[x, y] = (byte)Math.Clamp((int)Math.Round(value), 0, 255);
            }
        }
        return img;
    }

    /// <summary>Texture value at a continuous point.</summary>
    public double Value(double x, double y)
    {
        double v = 120;
        double amplitude = 40;
        for (int octave = 0, size = 64; octave < 4; octave++, size /= 2, amplitude *= 0.6)
        {
            v += amplitude * ValueNoise(x / size, y / size, (ulong)octave);
        }
        int cx = (int)Math.Floor(x / Cell), cy = (int)Math.Floor(y / Cell);
        ulong h = Hash((ulong)(uint)cx, (ulong)(uint)cy, 99);
        int kind = (int)(h % 4);
        double ox = Cell * (0.3 + 0.4 * Unit(h >> 8)), oy = Cell * (0.3 + 0.4 * Unit(h >> 20));
        double r = Cell * (0.12 + 0.2 * Unit(h >> 32));
        double angle = Math.PI * Unit(h >> 44);
        double lx = x - cx * Cell - ox, ly = y - cy * Cell - oy;
        double c = Math.Cos(angle), s = Math.Sin(angle);
        double a = c * lx + s * ly, b = -s * lx + c * ly;
        bool inside = kind switch
        {
            0 => a * a + b * b <= r * r,
            1 => Math.Abs(a) <= r && Math.Abs(b) <= r * 0.6,
            2 => b >= -r * 0.5 && b <= r && Math.Abs(a) <= (r - b) * 0.6,
            _ => Math.Abs(b) <= 2.5 && Math.Abs(a) <= r * 1.3,
        };
        if (inside)
        {
            v = (h >> 56) % 2 == 0 ? 30 + 40 * Unit(h >> 12) : 200 + 50 * Unit(h >> 16);
        }
        return v;
    }

    private double ValueNoise(double x, double y, ulong octave)
    {
        int ix = (int)Math.Floor(x), iy = (int)Math.Floor(y);
        double tx = x - ix, ty = y - iy;
        tx = tx * tx * (3 - 2 * tx);
        ty = ty * ty * (3 - 2 * ty);
        double a = Lattice(ix, iy, octave), b = Lattice(ix + 1, iy, octave);
        double c = Lattice(ix, iy + 1, octave), d = Lattice(ix + 1, iy + 1, octave);
        return (a + (b - a) * tx) * (1 - ty) + (c + (d - c) * tx) * ty;
    }

    private double Lattice(int x, int y, ulong octave) => 2 * Unit(Hash((ulong)(uint)x, (ulong)(uint)y, octave)) - 1;

    private ulong Hash(ulong x, ulong y, ulong z)
    {
        ulong h = seed ^ (x * 0x9E3779B97F4A7C15UL) ^ (y * 0xC2B2AE3D27D4EB4FUL) ^ (z * 0x165667B19E3779F9UL);
        h = (h ^ (h >> 30)) * 0xBF58476D1CE4E5B9UL;
        h = (h ^ (h >> 27)) * 0x94D049BB133111EBUL;
        return h ^ (h >> 31);
    }

    private static double Unit(ulong h) => (h & 0xFFFFF) / (double)0x100000;

    /// <summary>Almost uniform paper: a faint illumination gradient and pixel noise only.</summary>
    public static GrayImage Blank(int width, int height, double noiseSigma, ulong noiseSeed)
    {
        var img = new GrayImage(width, height);
        var g = new Gaussian(noiseSeed);
        for (int y = 0; y < height; y++)
        {
            for (int x = 0; x < width; x++)
            {
                img[x, y] = (byte)Math.Clamp((int)Math.Round(200 + 10.0 * x / width - 6.0 * y / height + noiseSigma * g.Next()), 0, 255);
            }
        }
        return img;
    }

    /// <summary>A strictly periodic tile pattern (the same motif every period pixels), seen through sceneToImage.</summary>
    public static GrayImage Periodic(int width, int height, int period, Transform2D sceneToImage, double noiseSigma, ulong noiseSeed)
    {
        var inv = sceneToImage.Inverse();
        var img = new GrayImage(width, height);
        var g = new Gaussian(noiseSeed);
        for (int y = 0; y < height; y++)
        {
            for (int x = 0; x < width; x++)
            {
                var (u, v) = inv.Apply(x, y);
                double fu = u - period * Math.Floor(u / period), fv = v - period * Math.Floor(v / period);
                double val = 90;
                if (fu > period * 0.2 && fu < period * 0.55 && fv > period * 0.25 && fv < period * 0.7)
                {
                    val = 210;
                }
                else if ((fu - period * 0.8) * (fu - period * 0.8) + (fv - period * 0.2) * (fv - period * 0.2) < period * period * 0.01)
                {
                    val = 30;
                }
                img[x, y] = (byte)Math.Clamp((int)Math.Round(val + noiseSigma * g.Next()), 0, 255);
            }
        }
        return img;
    }

    /// <summary>Standard normal variates (Box-Muller over splitmix64); test noise only.</summary>
    private sealed class Gaussian(ulong seed)
    {
        private ulong _s = seed;

        public double Next()
        {
            double u1 = (NextBits() + 1.0) / 9007199254740993.0, u2 = NextBits() / 9007199254740992.0;
            return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
        }

        private ulong NextBits()
        {
            ulong z = _s += 0x9E3779B97F4A7C15UL;
            z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
            z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
            return (z ^ (z >> 31)) >> 11;
        }
    }
}
