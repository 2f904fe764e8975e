using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Per-image analyses on disk, keyed by the image's SHA-256 and the feature-settings fingerprint,
/// under <c>.seamwright/features/&lt;fingerprint&gt;/&lt;hash[0..2]&gt;/&lt;hash&gt;.bin</c>. Entries are written
/// atomically but not flushed (a cache); an entry that fails to decode is treated as absent and rewritten.
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

    public void Put(string hash, string featureFingerprint, ImageAnalysis analysis) =>
        AtomicFile.WriteAllBytesNotDurable(PathOf(hash, featureFingerprint), engine.Encode(analysis));

    private string PathOf(string hash, string fp) => Path.Combine(_folder, fp, hash[..2], hash + ".bin");
}
