namespace Seamwright.Core.Imaging;

/// <summary>The input range a high-depth image was stretched from: Low maps to 0, High to 255.</summary>
public readonly record struct StretchRange(int Low, int High);

/// <summary>
/// Converts 16-bit samples to 8 bits by a linear stretch between two percentiles of the
/// histogram (default 0.1 % and 99.9 %, common practice), so scans that use a small part of the
/// 16-bit range keep their contrast; a bit shift would throw most of it away.
/// </summary>
public static class PercentileStretch
{
    public static StretchRange FindRange(ReadOnlySpan<ushort> samples, double lowPercent, double highPercent)
    {
        if (!(lowPercent >= 0 && lowPercent < highPercent && highPercent <= 100))
        {
            throw new ArgumentOutOfRangeException(nameof(lowPercent), $"Need 0 <= low < high <= 100, got {lowPercent} and {highPercent}.");
        }
        if (samples.IsEmpty)
        {
            return new StretchRange(0, 65535);
        }
        var histogram = new long[65536];
        foreach (ushort s in samples)
        {
            histogram[s]++;
        }
        long n = samples.Length;
        // Low: the first value whose cumulative count exceeds low% of the samples;
        // high: the first value whose cumulative count reaches high% of the samples.
        double lowCount = n * lowPercent / 100.0;
        double highCount = n * highPercent / 100.0;
        long cumulative = 0;
        int low = -1;
        int high = 65535;
        for (int v = 0; v < 65536; v++)
        {
            cumulative += histogram[v];
            if (low < 0 && cumulative > lowCount)
            {
                low = v;
            }
            if (cumulative >= highCount && cumulative > 0)
            {
                high = v;
                break;
            }
        }
        low = Math.Max(low, 0);
        return new StretchRange(Math.Min(low, high), high);
    }

    /// <summary>Maps samples to bytes; a flat range maps every sample to its plain 8-bit value.</summary>
    public static void Apply(ReadOnlySpan<ushort> samples, StretchRange range, Span<byte> output)
    {
        if (output.Length != samples.Length)
        {
            throw new ArgumentException("Output and input lengths differ.", nameof(output));
        }
        if (range.High <= range.Low)
        {
            for (int i = 0; i < samples.Length; i++)
            {
                output[i] = (byte)((samples[i] + 128) / 257);
            }
            return;
        }
        Span<byte> table = new byte[65536];
        double factor = 255.0 / (range.High - range.Low);
        for (int v = 0; v < 65536; v++)
        {
            double mapped = (v - range.Low) * factor;
            table[v] = mapped <= 0 ? (byte)0 : mapped >= 255 ? (byte)255 : (byte)Math.Round(mapped, MidpointRounding.AwayFromZero);
        }
        for (int i = 0; i < samples.Length; i++)
        {
            output[i] = table[samples[i]];
        }
    }
}
