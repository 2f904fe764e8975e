namespace Seamwright.Pipeline.Sets;

/// <summary>One input image of a set as found on disk.</summary>
/// <param name="FullPath">Absolute path of the input.</param>
/// <param name="RootPath">Path relative to the watched root, '/' separators (the ledger key).</param>
/// <param name="Key">Name of the image within its set (file name, or root-relative path for pattern sets); unique in the set.</param>
public sealed record InputFile(string FullPath, string RootPath, string Key, long Size, long MtimeTicks);

/// <summary>A set as discovered: its id, its images, and what completion needs to know.</summary>
/// <param name="SetId">Folder path relative to the root ('/' separators, "." for the root itself), or the key of a pattern set.</param>
/// <param name="Profile">Name of the profile that applies.</param>
/// <param name="HasReadyMarker">The profile's ready-marker file is present.</param>
public sealed record SetInputs(string SetId, string Profile, IReadOnlyList<InputFile> Files, bool HasReadyMarker)
{
    /// <summary>A digest of (key, size, time) of every file: equal digests mean unchanged inputs.</summary>
    public string InputsDigest()
    {
        var sb = new System.Text.StringBuilder();
        foreach (var f in Files.OrderBy(f => f.Key, StringComparer.Ordinal))
        {
            sb.Append(f.Key).Append('\0').Append(f.Size).Append('\0').Append(f.MtimeTicks).Append('\n');
        }
        return Settings.SettingsFingerprint.Digest(sb.ToString());
    }
}
