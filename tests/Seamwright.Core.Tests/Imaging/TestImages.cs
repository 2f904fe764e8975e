using Seamwright.Core.Imaging;

namespace Seamwright.Core.Tests.Imaging;

internal static class TestImages
{
    public static GrayImage Create(int width, int height, Func<int, int, int> value)
    {
        var image = new GrayImage(width, height);
        for (int y = 0; y < height; y++)
        {
            for (int x = 0; x < width; x++)
            {
                image[x, y] = (byte)Math.Clamp(value(x, y), 0, 255);
            }
        }
        return image;
    }

    /// <summary>Deterministic pseudo-random bytes (a fixed LCG; test input only, not a result).</summary>
    public static GrayImage Noise(int width, int height, uint seed)
    {
        var image = new GrayImage(width, height);
        uint s = seed;
        for (int i = 0; i < image.Pixels.Length; i++)
        {
            s = s * 1664525u + 1013904223u;
            image.Pixels[i] = (byte)(s >> 24);
        }
        return image;
    }

    public static double MeanAbsDiff(GrayImage a, GrayImage b, int margin)
    {
        double sum = 0;
        int n = 0;
        for (int y = margin; y < a.Height - margin; y++)
        {
            for (int x = margin; x < a.Width - margin; x++)
            {
                sum += Math.Abs(a[x, y] - b[x, y]);
                n++;
            }
        }
        return sum / n;
    }
}
