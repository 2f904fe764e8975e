namespace Seamwright.Core.Features.ScaleSpace;

/// <summary>
/// One octave of a Gaussian scale space: intervals + 3 blurred images whose deviations grow by
/// 2^(1/intervals) from the base deviation, and the differences of neighbouring ones (Lowe, IJCV
/// 2004, section 3). <see cref="Step"/> is detector-image pixels per pixel of this octave.
/// </summary>
public sealed class GaussianOctave
{
    private GaussianOctave(int index, FloatPlane[] gaussians, FloatPlane[] differences, double[] sigmas)
    {
        Index = index;
        Gaussians = gaussians;
        Differences = differences;
        Sigmas = sigmas;
    }

    public int Index { get; }

    public double Step => Math.Pow(2, Index);

    /// <summary>Blurred images, Gaussians[i] at deviation <see cref="Sigmas"/>[i] pixels of this octave.</summary>
    public FloatPlane[] Gaussians { get; }

    /// <summary>Differences[i] = Gaussians[i + 1] - Gaussians[i].</summary>
    public FloatPlane[] Differences { get; }

    public double[] Sigmas { get; }

    public int Width => Gaussians[0].Width;

    public int Height => Gaussians[0].Height;

    /// <summary>Blurs an octave from its base image (already at the base deviation).</summary>
    public static GaussianOctave Create(FloatPlane baseImage, int index, ScaleSpaceOptions options)
    {
        ArgumentNullException.ThrowIfNull(baseImage);
        ArgumentNullException.ThrowIfNull(options);
        int s = options.IntervalsPerOctave;
        double k = Math.Pow(2, 1.0 / s);
        var sigmas = new double[s + 3];
        var g = new FloatPlane[s + 3];
        sigmas[0] = options.BaseSigma;
        g[0] = baseImage;
        for (int i = 1; i < g.Length; i++)
        {
            sigmas[i] = options.BaseSigma * Math.Pow(k, i);
            g[i] = g[i - 1].Blurred(Math.Sqrt(sigmas[i] * sigmas[i] - sigmas[i - 1] * sigmas[i - 1]));
        }
        var d = new FloatPlane[s + 2];
        for (int i = 0; i < d.Length; i++)
        {
            d[i] = FloatPlane.Difference(g[i + 1], g[i]);
        }
        return new GaussianOctave(index, g, d, sigmas);
    }

    /// <summary>The next octave's base: the image at twice the base deviation, every second pixel.</summary>
    public FloatPlane NextBase() => Gaussians[Gaussians.Length - 3].HalfSize();
}
