using System.Security.Cryptography;

namespace Seamwright.Pipeline.Quarantine;

/// <summary>
/// A file as it is now: path, size, last write time (UTC ticks) and SHA-256 of the content.
/// Any change to size, time or content makes a different identity, which is what releases a
/// quarantined file ("never retried until it changes").
/// </summary>
public sealed record FileIdentity(string Path, long Size, long LastWriteUtcTicks, string Sha256)
{
    public static FileIdentity Of(string path)
    {
        var info = new FileInfo(path);
        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete, 1 << 16);
        string hash = Convert.ToHexStringLower(SHA256.HashData(stream));
        return new FileIdentity(System.IO.Path.GetFullPath(path), info.Length, info.LastWriteTimeUtc.Ticks, hash);
    }

    public bool SameContentAs(FileIdentity other) =>
        Size == other.Size && LastWriteUtcTicks == other.LastWriteUtcTicks && string.Equals(Sha256, other.Sha256, StringComparison.Ordinal);
}

/// <summary>A quarantined file with the reason of its last strike.</summary>
public sealed record QuarantineEntry(FileIdentity File, int Strikes, string Reason, DateTimeOffset QuarantinedAt);
