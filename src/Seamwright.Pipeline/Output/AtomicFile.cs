using System.Runtime.InteropServices;

namespace Seamwright.Pipeline.Output;

/// <summary>
/// Atomic file replacement: the content goes to a temporary file in the target's folder, is
/// flushed to disk (<c>Flush(true)</c>), and is renamed over the target; on Linux and macOS the
/// folder is then flushed too so the rename itself survives a power cut. A reader sees the old
/// file or the new one, never a mix. Temporary names start with '.' and end with
/// <see cref="TemporarySuffix"/>, so scanners can skip them and clean-up can find them. After a
/// failed flush the temporary file is deleted and the error thrown: the caller rewrites the whole
/// file from its source (retrying a failed flush can report success for lost data).
/// </summary>
public static class AtomicFile
{
    /// <summary>Suffix of temporary files written by this class.</summary>
    public const string TemporarySuffix = ".seamtmp";

    /// <summary>True for a name this class uses for temporary files.</summary>
    public static bool IsTemporary(string path) =>
        Path.GetFileName(path).StartsWith('.') && path.EndsWith(TemporarySuffix, StringComparison.Ordinal);

    public static void WriteAllBytes(string path, ReadOnlySpan<byte> bytes)
    {
        byte[] copy = bytes.ToArray();
        Write(path, stream => stream.Write(copy));
    }

    public static void WriteAllText(string path, string text) =>
        WriteAllBytes(path, new System.Text.UTF8Encoding(encoderShouldEmitUTF8Identifier: false).GetBytes(text));

    /// <summary>Alias of <see cref="TemporarySuffix"/>.</summary>
    public const string TempSuffix = TemporarySuffix;

    /// <summary>
    /// With <paramref name="syncDirectory"/> false the folder is not fsynced: the caller writes many
    /// files and calls <see cref="SyncDirectory"/> once per folder before anything that depends on
    /// them (a manifest) is written.
    /// </summary>
    public static void WriteAllBytes(string path, ReadOnlySpan<byte> bytes, bool syncDirectory)
    {
        byte[] copy = bytes.ToArray();
        Write(path, stream => stream.Write(copy), flushToDisk: true, syncDirectory);
    }

    /// <summary>
    /// Atomic (a reader sees the old or the whole new file) but not durable: no flush to disk. For
    /// caches, whose entries are checked on read and rebuilt when empty or damaged after a power cut.
    /// </summary>
    public static void WriteAllBytesNotDurable(string path, ReadOnlySpan<byte> bytes)
    {
        byte[] copy = bytes.ToArray();
        Write(path, stream => stream.Write(copy), flushToDisk: false, syncDirectory: false);
    }

    /// <summary>
    /// The first half of <see cref="WriteAllBytes(string, ReadOnlySpan{byte}, bool)"/>: the content in a
    /// temporary file beside <paramref name="path"/>, flushed to disk; nothing a reader sees has
    /// changed yet. <see cref="StagedFile.Commit"/> renames it over the target; disposing an
    /// uncommitted one deletes it.
    /// </summary>
    public static StagedFile Stage(string path, ReadOnlySpan<byte> bytes)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        string full = Path.GetFullPath(path);
        string folder = Path.GetDirectoryName(full) ?? throw new ArgumentException("The path has no folder.", nameof(path));
        Directory.CreateDirectory(folder);
        string temp = TemporaryFor(full);
        try
        {
            using var stream = new FileStream(temp, FileMode.CreateNew, FileAccess.Write, FileShare.None, 65536);
            stream.Write(bytes);
            stream.Flush(true);
        }
        catch
        {
            TryDelete(temp);
            throw;
        }
        return new StagedFile(full, temp);
    }

    private static string TemporaryFor(string full) =>
        Path.Combine(Path.GetDirectoryName(full)!, $".{Path.GetFileName(full)}.{WriterTag}.{Guid.NewGuid():N}{TemporarySuffix}");

    /// <summary>Makes the renames inside <paramref name="folder"/> durable (fsync of the folder on POSIX).</summary>
    public static void SyncDirectory(string folder) => FlushFolder(folder);

    /// <summary>
    /// Names the writer in temporary file names (<c>.NAME.TAG.GUID.seamtmp</c>): the process id, or,
    /// when several nodes share an output root, <see cref="WriterTagFor"/> of the node plus the
    /// process id, so a node sweeps only what its own earlier processes left.
    /// </summary>
    public static string WriterTag { get; set; } =
        (Environment.GetEnvironmentVariable(WriterPrefixVariable) ?? "") + Environment.ProcessId.ToString(System.Globalization.CultureInfo.InvariantCulture);

    /// <summary>Environment variable carrying a node's tag prefix to the worker processes it starts (they inherit it).</summary>
    public const string WriterPrefixVariable = "SEAMWRIGHT_WRITER_PREFIX";

    /// <summary>The tag prefix of a node's temporary files ("n" + the node name reduced to letters, digits, '_' and '-', then '-').</summary>
    public static string WriterTagFor(string node)
    {
        ArgumentNullException.ThrowIfNull(node);
        var safe = new string(node.Select(c => char.IsAsciiLetterOrDigit(c) || c is '-' or '_' ? c : '_').ToArray());
        return "n" + safe + "-";
    }

    /// <summary>Temporary files of other writers are left alone for this long (another node may be writing them).</summary>
    public static readonly TimeSpan ForeignTemporaryAge = TimeSpan.FromHours(1);

    /// <summary>
    /// On an output root shared by several nodes: deletes the temporary files whose writer tag starts
    /// with <paramref name="ownerPrefix"/> (this node's earlier processes, all dead now) and any older
    /// than <see cref="ForeignTemporaryAge"/>; sets the process's <see cref="WriterTag"/>. Returns how many.
    /// </summary>
    public static int SweepTemporaries(string root, string ownerPrefix)
    {
        ArgumentNullException.ThrowIfNull(ownerPrefix);
        WriterTag = ownerPrefix + Environment.ProcessId.ToString(System.Globalization.CultureInfo.InvariantCulture);
        Environment.SetEnvironmentVariable(WriterPrefixVariable, ownerPrefix);
        var cutoff = DateTime.UtcNow - ForeignTemporaryAge;
        return Sweep(root, f =>
        {
            var parts = Path.GetFileName(f).Split('.');
            bool own = parts.Length >= 4 && parts[^3].StartsWith(ownerPrefix, StringComparison.Ordinal);
            return own || File.GetLastWriteTimeUtc(f) < cutoff;
        });
    }

    /// <summary>Deletes temporary files left by an interrupted write under <paramref name="root"/>; returns how many.</summary>
    public static int SweepTemporaries(string root) => Sweep(root, _ => true);

    private static int Sweep(string root, Func<string, bool> mine)
    {
        if (!Directory.Exists(root))
        {
            return 0;
        }
        int n = 0;
        foreach (var f in Directory.EnumerateFiles(root, "*" + TemporarySuffix, SearchOption.AllDirectories))
        {
            if (IsTemporary(f) && mine(f))
            {
                try
                {
                    File.Delete(f);
                    n++;
                }
                catch (IOException)
                {
                }
                catch (UnauthorizedAccessException)
                {
                }
            }
        }
        return n;
    }

    /// <summary>Writes through <paramref name="write"/> into a temporary file, then replaces <paramref name="path"/>.</summary>
    public static void Write(string path, Action<Stream> write) => Write(path, write, flushToDisk: true, syncDirectory: true);

    private static void Write(string path, Action<Stream> write, bool flushToDisk, bool syncDirectory)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(write);
        string full = Path.GetFullPath(path);
        string folder = Path.GetDirectoryName(full) ?? throw new ArgumentException("The path has no folder.", nameof(path));
        Directory.CreateDirectory(folder);
        string temp = TemporaryFor(full);
        try
        {
            using (var stream = new FileStream(temp, FileMode.CreateNew, FileAccess.Write, FileShare.None, 65536))
            {
                write(stream);
                stream.Flush(flushToDisk);
            }
            File.Move(temp, full, overwrite: true);
        }
        catch
        {
            TryDelete(temp);
            throw;
        }
        if (syncDirectory)
        {
            FlushFolder(folder);
        }
    }

    internal static void TryDelete(string temp)
    {
        try
        {
            File.Delete(temp);
        }
        catch (IOException)
        {
            // Left for the start-up clean-up, which removes stale temporary files.
        }
        catch (UnauthorizedAccessException)
        {
            // As above.
        }
    }

    /// <summary>fsync on the folder (POSIX only; Windows has no equivalent for folders).</summary>
    private static void FlushFolder(string folder)
    {
        if (OperatingSystem.IsWindows())
        {
            return;
        }
        int fd = NativeMethods.open(folder, 0 /* O_RDONLY */);
        if (fd < 0)
        {
            return;
        }
        try
        {
            if (NativeMethods.fsync(fd) != 0)
            {
                throw new IOException($"fsync of folder '{folder}' failed (errno {Marshal.GetLastPInvokeError()})");
            }
        }
        finally
        {
            _ = NativeMethods.close(fd);
        }
    }

    private static class NativeMethods
    {
#pragma warning disable SYSLIB1054, CA5392, IDE1006 // plain libc calls, resolved from the C library only
        [DllImport("libc", SetLastError = true, CharSet = CharSet.Ansi, BestFitMapping = false, ThrowOnUnmappableChar = true)]
        internal static extern int open([MarshalAs(UnmanagedType.LPUTF8Str)] string path, int flags);

        [DllImport("libc", SetLastError = true)]
        internal static extern int fsync(int fd);

        [DllImport("libc", SetLastError = true)]
        internal static extern int close(int fd);
#pragma warning restore SYSLIB1054, CA5392, IDE1006
    }
}
