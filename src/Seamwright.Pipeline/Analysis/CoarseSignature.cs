namespace Seamwright.Pipeline.Analysis;

/// <summary>
/// A cheap whole-image signature for the <c>all</c> pre-filter: a 16-bin intensity histogram and
/// an 8-bin gradient-orientation histogram (weighted by gradient magnitude) of a small thumbnail,
/// each half scaled to unit length. Overlapping views of one scene share tone and edge statistics;
/// unrelated images usually do not. It only ranks candidates; the estimate decides.
/// </summary>
public static class CoarseSignature
{
    public const int Length = 24;

    /// <summary>From an 8-bit gray raster (row-major, <paramref name="width"/> x <paramref name="height"/>).</summary>
    public static float[] FromGray(ReadOnlySpan<byte> pixels, int width, int height)
    {
        var sig = new float[Length];
        if (width < 1 || height < 1)
        {
            return sig;
        }
        for (int y = 0; y < height; y++)
        {
            for (int x = 0; x < width; x++)
            {
                byte v = pixels[y * width + x];
                sig[v >> 4] += 1;
                if (x > 0 && y > 0 && x < width - 1 && y < height - 1)
                {
                    double gx = pixels[y * width + x + 1] - pixels[y * width + x - 1];
                    double gy = pixels[(y + 1) * width + x] - pixels[(y - 1) * width + x];
                    double mag = Math.Sqrt(gx * gx + gy * gy);
                    if (mag > 0)
                    {
                        double a = Math.Atan2(gy, gx); // -pi..pi; orientation modulo pi (edge direction)
                        if (a < 0)
                        {
                            a += Math.PI;
                        }
                        int bin = Math.Min(7, (int)(a / Math.PI * 8));
                        sig[16 + bin] += (float)mag;
                    }
                }
            }
        }
        Normalize(sig.AsSpan(0, 16));
        Normalize(sig.AsSpan(16, 8));
        Normalize(sig);
        return sig;
    }

    private static void Normalize(Span<float> v)
    {
        double n = 0;
        foreach (var x in v)
        {
            n += x * (double)x;
        }
        if (n <= 0)
        {
            return;
        }
        float s = (float)(1 / Math.Sqrt(n));
        for (int i = 0; i < v.Length; i++)
        {
            v[i] *= s;
        }
    }
}
