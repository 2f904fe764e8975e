using System.Security.Cryptography;
using System.Text;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Each pair's outcome on disk, so a rerun estimates only the pairs whose inputs changed. An
/// entry is keyed by the pair fingerprint (<see cref="Settings.SettingsFingerprint.ForPair"/>:
/// the settings that shape a pair) and a digest of both images' SHA-256 hashes and names (the
/// names give the pair's seed), under
/// <c>.seamwright/pairs/&lt;fingerprint&gt;/&lt;key[0..2]&gt;/&lt;key&gt;.bin</c>, in
/// <see cref="PairResultCodec"/>'s format. Written atomically, not flushed (a cache): an entry that
/// fails to decode is treated as absent, recomputed and rewritten.
/// </summary>
public sealed class PairResultCache(string outputRoot)
{
    private readonly string _folder = Path.Combine(outputRoot, State.StateStore.StateFolder, "pairs");

    /// <summary>The entry key of an ordered pair (hashes and names of A then B).</summary>
    public static string Key(string hashA, string nameA, string hashB, string nameB)
    {
        string text = string.Join('\n', hashA, nameA, hashB, nameB);
        return Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(text)).AsSpan(0, 16));
    }

    public bool Contains(string pairFingerprint, string key) => File.Exists(PathOf(pairFingerprint, key));

    public bool TryGet(string pairFingerprint, string key, out PairAnalysis pair)
    {
        string path = PathOf(pairFingerprint, key);
        pair = null!;
        if (!File.Exists(path))
        {
            return false;
        }
        try
        {
            pair = PairResultCodec.Decode(File.ReadAllBytes(path));
            return true;
        }
        catch (Exception e) when (e is InvalidDataException or IOException or UnauthorizedAccessException)
        {
            return false;
        }
    }

    public void Put(string pairFingerprint, string key, PairAnalysis pair) =>
        AtomicFile.WriteAllBytesNotDurable(PathOf(pairFingerprint, key), PairResultCodec.Encode(pair));

    private string PathOf(string fp, string key) => Path.Combine(_folder, fp, key[..2], key + ".bin");
}
