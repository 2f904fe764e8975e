using System.Buffers.Binary;
using System.Text;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Analysis;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Binary encoding of one pair's outcome for the pair-result cache (format 2): magic
/// <c>SWPR</c>, int32 format version, the estimate field by field (doubles as their exact IEEE
/// bits, strings as length-prefixed UTF-8), the tie points (four doubles each), then an FNV-1a 64
/// checksum of everything before it; little-endian. Lossless, so a reused result gives the same
/// output bytes as the estimate it came from. A damaged or foreign entry raises
/// <see cref="InvalidDataException"/>.
/// </summary>
public static class PairResultCodec
{
    public const int FormatVersion = 2;
    private static readonly byte[] Magic = "SWPR"u8.ToArray();

    public static byte[] Encode(PairAnalysis pair)
    {
        ArgumentNullException.ThrowIfNull(pair);
        var e = pair.Estimate;
        using var ms = new MemoryStream();
        using (var w = new BinaryWriter(ms, Encoding.UTF8, leaveOpen: true))
        {
            w.Write(Magic);
            w.Write(FormatVersion);
            w.Write((int)e.Model);
            w.Write(e.Transform.HasValue);
            foreach (double v in (e.Transform ?? Transform2D.Identity).ToRowMajor())
            {
                w.Write(v);
            }
            w.Write(e.MatchCount);
            w.Write(e.InlierIndices.Length);
            foreach (int i in e.InlierIndices)
            {
                w.Write(i);
            }
            w.Write(e.Consensus.Sampling);
            w.Write(e.Consensus.Refined);
            w.Write(e.Consensus.Final);
            w.Write(e.Consensus.RunnerUp);
            w.Write(e.Threshold);
            w.Write(e.Seed);
            w.Write((int)e.Status);
            WriteStrings(w, e.Reasons);
            w.Write(e.CornerSigmaPx);
            w.Write(e.RmsResidualPx);
            w.Write(e.Iterations);
            w.Write(e.LpCount);
            WriteStrings(w, e.Terminations);
            w.Write(e.TimingsMs.Sampling);
            w.Write(e.TimingsMs.Refinement);
            w.Write(e.TimingsMs.Polish);
            w.Write(e.TimingsMs.Total);
            w.Write((int)e.FeaturePath);
            w.Write(pair.TiePoints.Count);
            foreach (var t in pair.TiePoints)
            {
                w.Write(t.X1);
                w.Write(t.Y1);
                w.Write(t.X2);
                w.Write(t.Y2);
            }
        }
        ulong sum = Fnv1a(ms.GetBuffer().AsSpan(0, (int)ms.Length));
        Span<byte> tail = stackalloc byte[8];
        BinaryPrimitives.WriteUInt64LittleEndian(tail, sum);
        ms.Write(tail);
        return ms.ToArray();
    }

    public static PairAnalysis Decode(byte[] data)
    {
        ArgumentNullException.ThrowIfNull(data);
        if (data.Length < 16 || !data.AsSpan(0, 4).SequenceEqual(Magic))
        {
            throw new InvalidDataException("not a pair-result cache entry");
        }
        ulong expected = BinaryPrimitives.ReadUInt64LittleEndian(data.AsSpan(data.Length - 8));
        if (Fnv1a(data.AsSpan(0, data.Length - 8)) != expected)
        {
            throw new InvalidDataException("damaged pair-result cache entry (checksum)");
        }
        try
        {
            using var r = new BinaryReader(new MemoryStream(data, 4, data.Length - 12), Encoding.UTF8);
            if (r.ReadInt32() != FormatVersion)
            {
                throw new InvalidDataException("pair-result cache entry of another format version");
            }
            var model = (MotionModel)r.ReadInt32();
            bool hasTransform = r.ReadBoolean();
            Span<double> m = stackalloc double[9];
            for (int i = 0; i < 9; i++)
            {
                m[i] = r.ReadDouble();
            }
            int matchCount = r.ReadInt32();
            var inliers = new int[Count(r, data.Length / 4)];
            for (int i = 0; i < inliers.Length; i++)
            {
                inliers[i] = r.ReadInt32();
            }
            var consensus = new ConsensusFigures(r.ReadInt32(), r.ReadInt32(), r.ReadInt32(), r.ReadInt32());
            double threshold = r.ReadDouble();
            ulong seed = r.ReadUInt64();
            var status = (PairStatus)r.ReadInt32();
            string[] reasons = ReadStrings(r, data.Length);
            double cornerSigma = r.ReadDouble(), rms = r.ReadDouble();
            int iterations = r.ReadInt32(), lps = r.ReadInt32();
            string[] terminations = ReadStrings(r, data.Length);
            var timings = new EstimateTimings(r.ReadDouble(), r.ReadDouble(), r.ReadDouble(), r.ReadDouble());
            int path = r.ReadInt32();
            if (!Enum.IsDefined((FeaturePath)path))
            {
                throw new InvalidDataException("damaged pair-result cache entry (feature path)");
            }
            var ties = new Correspondence[Count(r, data.Length / 32)];
            for (int i = 0; i < ties.Length; i++)
            {
                ties[i] = new Correspondence(r.ReadDouble(), r.ReadDouble(), r.ReadDouble(), r.ReadDouble());
            }
            if (r.BaseStream.Position != r.BaseStream.Length)
            {
                throw new InvalidDataException("damaged pair-result cache entry (trailing bytes)");
            }
            var estimate = new PairEstimate
            {
                Model = model,
                Transform = hasTransform ? Transform2D.FromRowMajor(m) : null,
                MatchCount = matchCount,
                InlierIndices = inliers,
                Consensus = consensus,
                Threshold = threshold,
                Seed = seed,
                Status = status,
                Reasons = reasons,
                CornerSigmaPx = cornerSigma,
                RmsResidualPx = rms,
                Iterations = iterations,
                LpCount = lps,
                Terminations = terminations,
                TimingsMs = timings,
                FeaturePath = (FeaturePath)path,
            };
            return new PairAnalysis(estimate, ties);
        }
        catch (EndOfStreamException e)
        {
            throw new InvalidDataException("damaged pair-result cache entry (truncated)", e);
        }
    }

    private static int Count(BinaryReader r, int max)
    {
        int n = r.ReadInt32();
        return n < 0 || n > max ? throw new InvalidDataException("damaged pair-result cache entry (count)") : n;
    }

    private static void WriteStrings(BinaryWriter w, string[] values)
    {
        w.Write(values.Length);
        foreach (string s in values)
        {
            w.Write(s);
        }
    }

    private static string[] ReadStrings(BinaryReader r, int max)
    {
        var values = new string[Count(r, max)];
        for (int i = 0; i < values.Length; i++)
        {
            values[i] = r.ReadString();
        }
        return values;
    }

    private static ulong Fnv1a(ReadOnlySpan<byte> data)
    {
        ulong h = 14695981039346656037UL;
        foreach (byte b in data)
        {
            h = (h ^ b) * 1099511628211UL;
        }
        return h;
    }
}
