using Seamwright.Core.Estimation;
using Seamwright.Core.Features;
using Xunit;

namespace Seamwright.Core.Tests.Features;

/// <summary>
/// The batched correlation of the re-localisation against its scalar definition: every correction's
/// result must be bit-identical, whatever the number of corrections per call, including sample
/// positions at the patch's last pixels (where the vector path's gathers would read past the patch
/// and the scalar loop takes over).
/// </summary>
public sealed class PatchCorrelationTests
{
    private const int Radius = 14;
    private const int Side = 2 * Radius + 1;

    [Fact]
    public void Correlate_BatchedCorrections_BitIdenticalToScalar()
    {
        var rng = new Xoshiro256StarStar(17);
        int compared = 0, vector = 0, scalarOnly = 0;
        for (int trial = 0; trial < 200; trial++)
        {
            var (pixels, patchStart) = Pixels(ref rng, trial % 3 == 0);
            var other = new FullResolutionPatch(pixels.AsSpan(patchStart, Side * Side), Radius, Radius, Radius);
            int t = 3 + (int)(rng.NextDouble() * 10);
            var template = Template(ref rng, t, out double energy, out var qx, out var qy, trial % 5 == 0);
            var samples = new CorrelationTemplate(template, energy, qx, qy, qx.Min(), qx.Max(), qy.Min(), qy.Max());
            float lo = -samples.MinX + 1, hi = Side - 2 - samples.MaxX;
            float loY = -samples.MinY + 1, hiY = Side - 2 - samples.MaxY;
            if (hi - lo < 2 || hiY - loY < 2)
            {
                continue;
            }
            int m = 1 + trial % PatchCorrelation.MaxOffsets;
            var dx = new float[m];
            var dy = new float[m];
            for (int k = 0; k < m; k++)
            {
                // Integer and fractional corrections, a few right at the edge the scalar loop still accepts.
                bool edge = trial % 4 == 0 && k == 0;
                dx[k] = edge ? hi : lo + (float)(rng.NextDouble() * (hi - lo));
                dy[k] = edge ? hiY : trial % 2 == 0 ? (int)(loY + rng.NextDouble() * (hiY - loY)) : loY + (float)(rng.NextDouble() * (hiY - loY));
            }
            if (PatchCorrelation.UsesLanes(samples, dx, dy, other))
            {
                vector++;
            }
            else
            {
                scalarOnly++;
            }
            var best = new double[m];
            var scalar = new double[m];
            PatchCorrelation.Correlate(samples, dx, dy, other, best);
            PatchCorrelation.Correlate(samples, dx, dy, other, scalar, PatchCorrelation.Path.Scalar);
            for (int k = 0; k < m; k++)
            {
                Assert.Equal(BitConverter.DoubleToInt64Bits(scalar[k]), BitConverter.DoubleToInt64Bits(best[k]));
                Assert.Equal(BitConverter.DoubleToInt64Bits(PatchCorrelation.Scalar(samples, dx[k], dy[k], other)), BitConverter.DoubleToInt64Bits(best[k]));
                compared++;
            }
        }
        Assert.True(compared > 400, $"only {compared} corrections compared");
        if (System.Runtime.Intrinsics.X86.Avx2.IsSupported)
        {
            // Both paths must have run: the lanes, and the scalar loop at the end of the pixels.
            Assert.True(vector > 50 && scalarOnly > 5, $"{vector} calls on the vector path, {scalarOnly} on the scalar one");
        }
    }

    [Fact]
    public void Correlate_ShiftedCopy_PeaksAtTheShift()
    {
        var rng = new Xoshiro256StarStar(3);
        var (pixels, start) = Pixels(ref rng, last: false);
        var other = new FullResolutionPatch(pixels.AsSpan(start, Side * Side), Radius, Radius, Radius);
        // The template is the other patch's own pixels around (Radius + 2, Radius - 1), sampled at integer positions.
        int t = 6;
        var values = new float[(2 * t + 1) * (2 * t + 1)];
        var qx = new float[values.Length];
        var qy = new float[values.Length];
        double mean = 0;
        for (int v = -t, k = 0; v <= t; v++)
        {
            for (int u = -t; u <= t; u++, k++)
            {
                values[k] = pixels[start + (Radius - 1 + v) * Side + Radius + 2 + u];
                qx[k] = Radius + u;
                qy[k] = Radius + v;
                mean += values[k];
            }
        }
        mean /= values.Length;
        double energy = 0;
        for (int k = 0; k < values.Length; k++)
        {
            values[k] -= (float)mean;
            energy += values[k] * values[k];
        }
        var samples = new CorrelationTemplate(values, energy, qx, qy, qx.Min(), qx.Max(), qy.Min(), qy.Max());
        float[] dx = [0, 2, -2, 2, 1], dy = [0, -1, 1, 0, -1];
        var r = new double[dx.Length];
        PatchCorrelation.Correlate(samples, dx, dy, other, r);
        Assert.Equal(1.0, r[1], 6);
        Assert.All(new[] { r[0], r[2], r[3], r[4] }, c => Assert.True(c < 0.9, $"correlation {c} away from the shift"));
    }

    /// <summary>Random pixels with the patch placed last in the array (so nothing follows it) or in the middle.</summary>
    private static (byte[] Pixels, int Start) Pixels(ref Xoshiro256StarStar rng, bool last)
    {
        int before = 2 * Side * Side, after = last ? 0 : Side * Side;
        var pixels = new byte[before + Side * Side + after];
        for (int i = 0; i < pixels.Length; i++)
        {
            pixels[i] = (byte)(rng.NextDouble() * 256);
        }
        return (pixels, before);
    }

    /// <summary>A zero-mean template of radius t whose samples fall on a rotated, scaled grid around the patch centre.</summary>
    private static float[] Template(ref Xoshiro256StarStar rng, int t, out double energy, out float[] qx, out float[] qy, bool flat)
    {
        int side = 2 * t + 1, n = side * side;
        var values = new float[n];
        qx = new float[n];
        qy = new float[n];
        double angle = rng.NextDouble() * 2 * Math.PI, scale = 0.8 + 0.4 * rng.NextDouble();
        double c = scale * Math.Cos(angle), s = scale * Math.Sin(angle);
        double mean = 0;
        for (int v = -t, k = 0; v <= t; v++)
        {
            for (int u = -t; u <= t; u++, k++)
            {
                values[k] = flat ? 100 : (float)Math.Floor(rng.NextDouble() * 256);
                qx[k] = (float)(Radius + 0.3 + c * u - s * v);
                qy[k] = (float)(Radius - 0.2 + s * u + c * v);
                mean += values[k];
            }
        }
        mean /= n;
        energy = 0;
        for (int k = 0; k < n; k++)
        {
            values[k] -= (float)mean;
            energy += values[k] * values[k];
        }
        return values;
    }
}
