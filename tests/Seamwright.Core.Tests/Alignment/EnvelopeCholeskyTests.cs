using Seamwright.Core.Alignment;

namespace Seamwright.Core.Tests.Alignment;

public sealed class EnvelopeCholeskyTests
{
    [Fact]
    public void Solve_BandedPositiveDefinite_MatchesDenseGaussianElimination()
    {
        const int n = 40;
        var noise = new TestNoise(7);
        var dense = new double[n, n];
        var first = new int[n];
        for (int i = 0; i < n; i++)
        {
            first[i] = Math.Max(0, i - 1 - (i % 5));
            for (int j = first[i]; j < i; j++)
            {
                double v = noise.Uniform() - 0.5;
                dense[i, j] = v;
                dense[j, i] = v;
            }
            dense[i, i] = 4 + noise.Uniform();
        }
        var envelope = new EnvelopeCholesky(first);
        for (int i = 0; i < n; i++)
        {
            for (int j = first[i]; j <= i; j++)
            {
                envelope.Add(i, j, dense[i, j]);
            }
        }
        var b = Enumerable.Range(0, n).Select(_ => noise.Uniform()).ToArray();
        var x = (double[])b.Clone();
        Assert.True(envelope.Factorize());
        envelope.Solve(x);
        // Residual of the original system.
        for (int i = 0; i < n; i++)
        {
            double s = 0;
            for (int j = 0; j < n; j++)
            {
                s += dense[i, j] * x[j];
            }
            Assert.Equal(b[i], s, 1e-10);
        }
        Assert.True(envelope.StoredEntries < n * (n + 1) / 4);
    }

    [Fact]
    public void Factorize_IndefiniteMatrix_ReturnsFalse()
    {
        var m = new EnvelopeCholesky([0, 0]);
        m.Add(0, 0, 1);
        m.Add(1, 0, 2);
        m.Add(1, 1, 1);
        Assert.False(m.Factorize());
    }

    [Theory]
    [InlineData(0)]
    [InlineData(1)]
    [InlineData(3)]
    [InlineData(4)]
    [InlineData(7)]
    [InlineData(9)]
    [InlineData(204)]
    public void Dot_EveryLength_EqualsTheFourPartialSumsAndTheTail(int n)
    {
        var rng = new Random(n + 1);
        var a = Enumerable.Range(0, n).Select(_ => rng.NextDouble() - 0.5).ToArray();
        var b = Enumerable.Range(0, n + 2).Select(_ => rng.NextDouble() - 0.5).ToArray();
        // The definition, written out: lane k % 4 for the whole groups of four, then the tail in order.
        var lanes = new double[4];
        int whole = n / 4 * 4;
        for (int k = 0; k < whole; k++)
        {
            lanes[k % 4] += a[k] * b[k];
        }
        double expected = (lanes[0] + lanes[1]) + (lanes[2] + lanes[3]);
        for (int k = whole; k < n; k++)
        {
            expected += a[k] * b[k];
        }
        Assert.Equal(expected, EnvelopeCholesky.Dot(a, b));
        Assert.Equal(a.Zip(b).Sum(p => p.First * p.Second), EnvelopeCholesky.Dot(a, b), 1e-12);
    }
}
