namespace Seamwright.Core.Synthetic;

/// <summary>
/// Stateless value noise on an integer lattice hashed with 64-bit mixing, so it never repeats
/// (no period) and any point can be evaluated on its own. Values lie in [0, 1].
/// </summary>
internal static class LatticeNoise
{
    private const ulong RowMul = 0xD6E8FEB86659FD93UL;
    private const ulong ColumnMul = 0x9E3779B97F4A7C15UL;
    private const ulong SaltMul = 0x632BE59BD9B4E019UL;

    public static ulong Hash(ulong seed, ulong salt, long ix, long iy) =>
        SyntheticRandom.Mix(((ulong)ix * ColumnMul) ^ RowHash(seed, salt, iy));

    public static double Unit(ulong hash) => (hash >> 11) * (1.0 / (1UL << 53));

    /// <summary>Value noise with lattice spacing <paramref name="spacing"/> and a quintic fade.</summary>
    public static double Value(ulong seed, ulong salt, double x, double y, double spacing) =>
        ValueWithGradient(seed, salt, x, y, spacing, out _, out _);

    /// <summary>Value noise and its exact gradient (per scene unit).</summary>
    public static double ValueWithGradient(ulong seed, ulong salt, double x, double y, double spacing, out double gx, out double gy)
    {
        double fx = x / spacing;
        double fy = y / spacing;
        double flx = Math.Floor(fx);
        double fly = Math.Floor(fy);
        long ix = (long)flx;
        long iy = (long)fly;
        double rx = fx - flx;
        double ry = fy - fly;
        double tx = Fade(rx);
        double ty = Fade(ry);
        ulong row0 = RowHash(seed, salt, iy);
        ulong row1 = RowHash(seed, salt, iy + 1);
        ulong col0 = (ulong)ix * ColumnMul;
        ulong col1 = (ulong)(ix + 1) * ColumnMul;
        double a = Unit(SyntheticRandom.Mix(col0 ^ row0));
        double b = Unit(SyntheticRandom.Mix(col1 ^ row0));
        double c = Unit(SyntheticRandom.Mix(col0 ^ row1));
        double d = Unit(SyntheticRandom.Mix(col1 ^ row1));
        double top = a + tx * (b - a);
        double bottom = c + tx * (d - c);
        double dtx = FadeDerivative(rx) / spacing;
        double dty = FadeDerivative(ry) / spacing;
        gx = dtx * ((b - a) + ty * ((d - c) - (b - a)));
        gy = dty * (bottom - top);
        return top + ty * (bottom - top);
    }

    /// <summary>Fractal sum of octaves (each half the spacing and half the amplitude), normalised to [0, 1].</summary>
    public static double Fractal(ulong seed, ulong salt, double x, double y, double spacing, int octaves) =>
        FractalWithGradient(seed, salt, x, y, spacing, octaves, out _, out _);

    /// <summary>As <see cref="Fractal"/>, with the exact gradient.</summary>
    public static double FractalWithGradient(ulong seed, ulong salt, double x, double y, double spacing, int octaves, out double gx, out double gy)
    {
        double sum = 0;
        double norm = 0;
        double amp = 1;
        gx = 0;
        gy = 0;
        for (int o = 0; o < octaves; o++)
        {
            sum += amp * ValueWithGradient(seed, salt + (ulong)o, x, y, spacing, out double ox, out double oy);
            gx += amp * ox;
            gy += amp * oy;
            norm += amp;
            amp *= 0.5;
            spacing *= 0.5;
        }
        gx /= norm;
        gy /= norm;
        return sum / norm;
    }

    private static ulong RowHash(ulong seed, ulong salt, long iy) =>
        SyntheticRandom.Mix(((ulong)iy * RowMul) ^ (seed + salt * SaltMul));

    private static double Fade(double t) => t * t * t * (t * (t * 6 - 15) + 10);

    private static double FadeDerivative(double t) => 30 * t * t * (t * (t - 2) + 1);
}
