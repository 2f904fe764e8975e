namespace Seamwright.Core.Features;

/// <summary>
/// Robust estimate of the standard deviation of additive pixel noise. The image is filtered with
/// the mask [1 -2 1; -2 4 -2; 1 -2 1], which cancels locally linear structure (Immerkaer,
/// "Fast noise variance estimation", CVIU 1996); its response to white noise of deviation sigma
/// has deviation 6 sigma. The median absolute response (instead of Immerkaer's mean) keeps
/// edges and texture from inflating the figure: for a normal variable median|r| = 0.6745 sd.
/// </summary>
public static class NoiseLevel
{
    public static double Estimate(ReadOnlySpan<byte> pixels, int width, int height)
    {
        if (width < 3 || height < 3)
        {
            return 0;
        }
        // |response| <= 16 * 255.
        Span<int> histogram = new int[16 * 255 + 1];
        long count = 0;
        // Every second row and column: the median needs far fewer samples than a megapixel image gives.
        for (int y = 1; y < height - 1; y += 2)
        {
            var a = pixels.Slice((y - 1) * width, width);
            var b = pixels.Slice(y * width, width);
            var c = pixels.Slice((y + 1) * width, width);
            for (int x = 1; x < width - 1; x += 2)
            {
                int r = a[x - 1] - 2 * a[x] + a[x + 1]
                    - 2 * (b[x - 1] - 2 * b[x] + b[x + 1])
                    + c[x - 1] - 2 * c[x] + c[x + 1];
                histogram[Math.Abs(r)]++;
                count++;
            }
        }
        long half = (count + 1) / 2, seen = 0;
        int median = 0;
        for (int i = 0; i < histogram.Length; i++)
        {
            seen += histogram[i];
            if (seen >= half)
            {
                median = i;
                break;
            }
        }
        return median / (0.6745 * 6.0);
    }
}
