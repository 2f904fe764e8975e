using System.Buffers.Binary;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Analysis;

/// <summary>
/// A fast engine for the service's own tests (Engine = "checksum"): it really decodes each image
/// with the limits (so broken files are found), computes the coarse signature, but estimates
/// nothing: every pair gets the identity with the four image corners as tie points, status
/// accepted, and a reason saying that no estimate was made. Never use it for real work.
/// </summary>
public sealed class ChecksumEngine : IPairEngine
{
    public const string EngineName = "checksum";

    public string Name => EngineName;

    public string DescriptorVersion => "none";

    public int AlgorithmVersion => 1;

    public ImageAnalysis Analyze(string path, FeatureSettings features, LimitSettings limits, MemoryBudget budget, CancellationToken cancel)
    {
        var gray = BasicImageReader.Read(path, limits, budget, cancel);
        return new ImageAnalysis
        {
            Size = new ImageSize(gray.Width, gray.Height),
            Coarse = CoarseSignature.FromGray(gray.Pixels, gray.Width, gray.Height),
            CaptureTime = gray.CaptureTime,
            Payload = gray.Width,
        };
    }

    public byte[] Encode(ImageAnalysis analysis)
    {
        ArgumentNullException.ThrowIfNull(analysis);
        var bytes = new byte[8 + 8 + 4 * analysis.Coarse.Length];
        BinaryPrimitives.WriteInt32LittleEndian(bytes, analysis.Size.Width);
        BinaryPrimitives.WriteInt32LittleEndian(bytes.AsSpan(4), analysis.Size.Height);
        BinaryPrimitives.WriteInt64LittleEndian(bytes.AsSpan(8), analysis.CaptureTime?.UtcTicks ?? -1);
        for (int i = 0; i < analysis.Coarse.Length; i++)
        {
            BinaryPrimitives.WriteSingleLittleEndian(bytes.AsSpan(16 + 4 * i), analysis.Coarse[i]);
        }
        return bytes;
    }

    public ImageAnalysis Decode(ReadOnlySpan<byte> data)
    {
        if (data.Length < 16 || (data.Length - 16) % 4 != 0)
        {
            throw new InvalidDataException("checksum engine cache entry has a wrong length");
        }
        int w = BinaryPrimitives.ReadInt32LittleEndian(data);
        int h = BinaryPrimitives.ReadInt32LittleEndian(data[4..]);
        long t = BinaryPrimitives.ReadInt64LittleEndian(data[8..]);
        var coarse = new float[(data.Length - 16) / 4];
        for (int i = 0; i < coarse.Length; i++)
        {
            coarse[i] = BinaryPrimitives.ReadSingleLittleEndian(data[(16 + 4 * i)..]);
        }
        return new ImageAnalysis
        {
            Size = new ImageSize(w, h),
            Coarse = coarse,
            CaptureTime = t < 0 ? null : new DateTimeOffset(t, TimeSpan.Zero),
            Payload = w,
        };
    }

    public PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, EstimationSettings settings, ulong seed)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        ArgumentNullException.ThrowIfNull(settings);
        var corners = Transform2D.Corners(Math.Min(a.Size.Width, b.Size.Width), Math.Min(a.Size.Height, b.Size.Height));
        var ties = corners.Select(c => new Correspondence(c.X, c.Y, c.X, c.Y)).ToArray();
        var estimate = new PairEstimate
        {
            Model = settings.MotionModel,
            Transform = Transform2D.Identity,
            MatchCount = ties.Length,
            InlierIndices = [0, 1, 2, 3],
            Consensus = new ConsensusFigures(4, 4, 4, 0),
            Threshold = settings.ThresholdPx,
            Seed = seed,
            Status = PairStatus.Accepted,
            Reasons = ["checksum engine: images decoded, no estimate made (test engine)"],
            CornerSigmaPx = 0,
            RmsResidualPx = 0,
            Iterations = 0,
            LpCount = 0,
            Terminations = ["test engine"],
            TimingsMs = new EstimateTimings(0, 0, 0, 0),
        };
        return new PairAnalysis(estimate, ties);
    }
}
