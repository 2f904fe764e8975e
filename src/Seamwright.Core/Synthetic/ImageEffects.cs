using Seamwright.Core.Imaging;

namespace Seamwright.Core.Synthetic;

/// <summary>Seeded, deterministic image changes and special test images.</summary>
public static class ImageEffects
{
    /// <summary>Adds zero-mean Gaussian noise of standard deviation <paramref name="sigma"/> gray levels.</summary>
    public static GrayImage AddGaussianNoise(GrayImage image, double sigma, ulong seed)
    {
        ArgumentNullException.ThrowIfNull(image);
        ArgumentOutOfRangeException.ThrowIfNegative(sigma);
        var rng = new SyntheticRandom(seed);
        var result = new GrayImage(image.Width, image.Height);
        byte[] src = image.Pixels;
        byte[] dst = result.Pixels;
        for (int i = 0; i < src.Length; i++)
        {
            dst[i] = AreaResampler.ToByte((float)(src[i] + sigma * rng.NextGaussian()));
        }
        return result;
    }

    /// <summary>v' = (v - 127.5) contrast + 127.5 + brightness, rounded and clamped to 0..255.</summary>
    public static GrayImage AdjustBrightnessContrast(GrayImage image, double contrast, double brightness)
    {
        ArgumentNullException.ThrowIfNull(image);
        Span<byte> table = stackalloc byte[256];
        for (int v = 0; v < 256; v++)
        {
            table[v] = AreaResampler.ToByte((float)((v - 127.5) * contrast + 127.5 + brightness));
        }
        var result = new GrayImage(image.Width, image.Height);
        byte[] src = image.Pixels;
        byte[] dst = result.Pixels;
        for (int i = 0; i < src.Length; i++)
        {
            dst[i] = table[src[i]];
        }
        return result;
    }

    /// <summary>A uniform image (blank paper); add noise for a realistic scan of blank paper.</summary>
    public static GrayImage Blank(int width, int height, byte value)
    {
        var image = new GrayImage(width, height);
        image.Pixels.AsSpan().Fill(value);
        return image;
    }

    /// <summary>
    /// One textured tile of <paramref name="period"/> x <paramref name="period"/> pixels taken from a
    /// seeded scene and repeated exactly over the image: rich in corners but ambiguous to match.
    /// </summary>
    public static GrayImage PeriodicPattern(int width, int height, int period, ulong seed)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(period, 4);
        var tile = SceneRenderer.Render(new ProceduralScene(seed, SceneStyle.Courtyard, period / 120.0), period, period,
            Geometry.Transform2D.Identity);
        var image = new GrayImage(width, height);
        for (int y = 0; y < height; y++)
        {
            Span<byte> row = image.Row(y);
            ReadOnlySpan<byte> tileRow = tile.Row(y % period);
            for (int x = 0; x < width; x++)
            {
                row[x] = tileRow[x % period];
            }
        }
        return image;
    }
}
