using System.Runtime.InteropServices;

namespace Seamwright.Pipeline.Output;

/// <summary>
/// Writes a file so that a reader sees either the old content or the complete new content:
/// a temporary file in the same folder, flushed to disk, renamed over the target, and on Unix
/// the folder fsynced so the rename itself survives a power cut (see RELIABILITY.md).
/// A failed flush is never retried: the whole file is rewritten from its source by the caller.
/// </summary>
public static class AtomicFile
{
    /// <summary>Suffix of temporary files; a sweep at start removes leftovers of a crash.</summary>
    public const string TempSuffix = ".seamtmp";

    public static void WriteAllBytes(string path, ReadOnlySpan<byte> bytes) => WriteAllBytes(path, bytes, syncDirectory: true);

    /// <summary>
    /// With <paramref name="syncDirectory"/> false the folder is not fsynced: the caller batches many
    /// files and calls <see cref="SyncDirectory"/> once for each folder before anything that depends
    /// on them (the manifest) is written.
    /// </summary>
    public static void WriteAllBytes(string path, ReadOnlySpan<byte> bytes, bool syncDirectory)
    {
        byte[] copy = bytes.ToArray();
        Write(path, s => s.Write(copy), syncDirectory);
    }

    /// <summary>
    /// Atomic (a reader sees the old or the whole new file) but not durable: no flush to disk. For
    /// caches, whose entries are checked on read and rebuilt when empty or damaged after a power cut.
    /// </summary>
    public static void WriteAllBytesNotDurable(string path, ReadOnlySpan<byte> bytes)
    {
        byte[] copy = bytes.ToArray();
        Write(path, s => s.Write(copy), syncDirectory: false, flushToDisk: false);
    }

    public static void WriteAllText(string path, string text) =>
        WriteAllBytes(path, System.Text.Encoding.UTF8.GetBytes(text));

    public static void Write(string path, Action<Stream> writeContent) => Write(path, writeContent, syncDirectory: true);

    public static void Write(string path, Action<Stream> writeContent, bool syncDirectory) => Write(path, writeContent, syncDirectory, flushToDisk: true);

    private static void Write(string path, Action<Stream> writeContent, bool syncDirectory, bool flushToDisk)
    {
        ArgumentNullException.ThrowIfNull(writeContent);
        string full = Path.GetFullPath(path);
        string dir = Path.GetDirectoryName(full) ?? throw new ArgumentException("No folder in " + path, nameof(path));
        Directory.CreateDirectory(dir);
        string temp = Path.Combine(dir, "." + Path.GetFileName(full) + "." + Guid.NewGuid().ToString("N")[..8] + TempSuffix);
        try
        {
            using (var fs = new FileStream(temp, FileMode.CreateNew, FileAccess.Write, FileShare.None, 64 * 1024))
            {
                writeContent(fs);
                fs.Flush(flushToDisk);
            }
            File.Move(temp, full, overwrite: true);
            if (syncDirectory)
            {
                SyncDirectory(dir);
            }
        }
        catch
        {
            TryDelete(temp);
            throw;
        }
    }

    /// <summary>Deletes temporary files left by an interrupted write under <paramref name="root"/>; returns how many.</summary>
    public static int SweepTemporaries(string root)
    {
        if (!Directory.Exists(root))
        {
            return 0;
        }
        int n = 0;
        foreach (var f in Directory.EnumerateFiles(root, "*" + TempSuffix, SearchOption.AllDirectories))
        {
            if (TryDelete(f))
            {
                n++;
            }
        }
        return n;
    }

    private static bool TryDelete(string path)
    {
        try
        {
            File.Delete(path);
            return true;
        }
        catch (IOException)
        {
            return false;
        }
        catch (UnauthorizedAccessException)
        {
            return false;
        }
    }

    /// <summary>Makes the renames inside <paramref name="dir"/> durable (fsync of the folder on Unix).</summary>
    public static void SyncDirectory(string dir)
    {
        if (RuntimeInformation.IsOSPlatform(OSPlatform.Windows))
        {
            return; // NTFS journals the rename; a folder handle cannot be flushed from .NET.
        }
        int fd = NativeMethods.open(dir, 0 /* O_RDONLY */);
        if (fd >= 0)
        {
            _ = NativeMethods.fsync(fd);
            _ = NativeMethods.close(fd);
        }
    }

    private static class NativeMethods
    {
        [DllImport("libc", SetLastError = true)]
#pragma warning disable CA2101, CA5392, SYSLIB1054 // plain libc calls; ASCII-safe paths are marshalled as UTF-8 below
        public static extern int open([MarshalAs(UnmanagedType.LPUTF8Str)] string path, int flags);

        [DllImport("libc", SetLastError = true)]
        public static extern int fsync(int fd);

        [DllImport("libc", SetLastError = true)]
        public static extern int close(int fd);
#pragma warning restore CA2101, CA5392, SYSLIB1054
    }
}
