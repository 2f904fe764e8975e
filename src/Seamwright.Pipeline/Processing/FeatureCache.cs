using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Per-image analyses on disk, keyed by the image's SHA-256 and the feature-settings fingerprint,
/// under <c>.seamwright/features/&lt;fingerprint&gt;/&lt;hash[0..2]&gt;/&lt;hash&gt;.bin</c>. Entries are written
/// atomically but not flushed (a cache); an entry that fails to decode is treated as absent and rewritten.
/// Beside each entry, <c>&lt;hash&gt;.sum</c> holds what a set keeps of the image once analysed
/// (<see cref="ImageSummaryCodec"/>), written after the entry, so the image stage reads only that
/// (<see cref="TryGetSummary"/>) and the pairs read features only for the pairs they estimate.
/// </summary>
public sealed class FeatureCache(string outputRoot, IPairEngine engine)
{
    private readonly string _folder = Path.Combine(outputRoot, State.StateStore.StateFolder, "features");

    public bool TryGet(string hash, string featureFingerprint, out ImageAnalysis analysis) =>
        TryGet(hash, featureFingerprint, out analysis, out _);

    /// <summary>As <see cref="TryGet(string, string, out ImageAnalysis)"/>, also giving the entry's length in bytes.</summary>
    public bool TryGet(string hash, string featureFingerprint, out ImageAnalysis analysis, out long bytes)
    {
        string path = PathOf(hash, featureFingerprint);
        analysis = null!;
        bytes = 0;
        if (!File.Exists(path))
        {
            return false;
        }
        try
        {
            byte[] data = File.ReadAllBytes(path);
            analysis = engine.Decode(data);
            bytes = data.Length;
            return true;
        }
        catch (Exception e) when (e is InvalidDataException or IOException or ArgumentException or IndexOutOfRangeException)
        {
            return false;
        }
    }

    /// <summary>
    /// The image's size, coarse signature and capture time without its features (an analysis with
    /// <see cref="ImageAnalysis.NotHeld"/>), from the summary beside the entry; an entry written
    /// before summaries existed (or whose summary is damaged) is decoded once and its summary written.
    /// False when the image has no usable entry. The features themselves may still turn out damaged
    /// when a pair reads them; <c>PairRunner</c> then analyses the image again.
    /// </summary>
    public bool TryGetSummary(string hash, string featureFingerprint, out ImageAnalysis summary)
    {
        string path = SummaryPathOf(hash, featureFingerprint);
        try
        {
            summary = ImageSummaryCodec.Decode(File.ReadAllBytes(path));
            return true;
        }
        catch (Exception e) when (e is InvalidDataException or IOException or UnauthorizedAccessException)
        {
            // absent or damaged: fall back to the entry itself
        }
        if (!TryGet(hash, featureFingerprint, out var full))
        {
            summary = null!;
            return false;
        }
        summary = full.WithoutPayload();
        AtomicFile.WriteAllBytesNotDurable(path, ImageSummaryCodec.Encode(summary));
        return true;
    }

    public void Put(string hash, string featureFingerprint, ImageAnalysis analysis)
    {
        AtomicFile.WriteAllBytesNotDurable(PathOf(hash, featureFingerprint), engine.Encode(analysis));
        AtomicFile.WriteAllBytesNotDurable(SummaryPathOf(hash, featureFingerprint), ImageSummaryCodec.Encode(analysis));
    }

    private string PathOf(string hash, string fp) => Path.Combine(_folder, fp, hash[..2], hash + ".bin");

    private string SummaryPathOf(string hash, string fp) => Path.Combine(_folder, fp, hash[..2], hash + ".sum");
}
