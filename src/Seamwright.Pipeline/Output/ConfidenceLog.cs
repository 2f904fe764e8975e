using System.Text;

namespace Seamwright.Pipeline.Output;

/// <summary>
/// The append-only <c>confidence.jsonl</c> at the output root: one JSON object per line. Each
/// batch is written with one write and flushed to disk; at open, a torn last line (no newline
/// at the end, left by a crash mid-append) is cut off. Several processes (nodes sharing the output
/// root) may append: every append, the cut at open and a retention rewrite hold an exclusive
/// advisory lock on <c>.seamwright/confidence.lock</c> (flock on Unix, a share-mode lock on
/// Windows; released by the OS when a process dies), so whole batches never interleave.
/// </summary>
public sealed class ConfidenceLog
{
    public const string FileName = "confidence.jsonl";
    private readonly object _gate = new();

    public const string LockName = "confidence.lock";
    private readonly string _lockPath;

    public ConfidenceLog(string outputRoot)
    {
        Path = System.IO.Path.Combine(outputRoot, FileName);
        string stateFolder = System.IO.Path.Combine(outputRoot, State.StateStore.StateFolder);
        Directory.CreateDirectory(stateFolder);
        _lockPath = System.IO.Path.Combine(stateFolder, LockName);
        using (HoldFileLock())
        {
            DroppedBytes = DropTornTail(Path);
        }
    }

    /// <summary>Takes the cross-process append lock, waiting (polling) while another process holds it.</summary>
    private FileStream HoldFileLock()
    {
        for (int attempt = 0; ; attempt++)
        {
            try
            {
                return new FileStream(_lockPath, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
            }
            catch (IOException) when (attempt < 30_000)
            {
                Thread.Sleep(attempt < 100 ? 2 : 20); // held by another process's append (milliseconds) or rewrite
            }
        }
    }

    public string Path { get; }

    /// <summary>Bytes cut from a torn last line at open (0 when the log was whole).</summary>
    public long DroppedBytes { get; }

    public void Append(IEnumerable<ConfidenceRecord> records)
    {
        var sb = new StringBuilder();
        foreach (var r in records)
        {
            sb.Append(OutputJson.ConfidenceLine(r)).Append('\n');
        }
        if (sb.Length == 0)
        {
            return;
        }
        byte[] bytes = Encoding.UTF8.GetBytes(sb.ToString());
        lock (_gate)
        {
            using var held = HoldFileLock();
            using var fs = new FileStream(Path, FileMode.Append, FileAccess.Write, FileShare.Read);
            fs.Write(bytes);
            fs.Flush(flushToDisk: true);
        }
    }

    /// <summary>Runs <paramref name="action"/> (e.g. a retention rewrite of the file) while no append can interleave.</summary>
    public void WithAppendsHeld(Action action)
    {
        ArgumentNullException.ThrowIfNull(action);
        lock (_gate)
        {
            using var held = HoldFileLock();
            action();
        }
    }

    /// <summary>Cuts everything after the last newline; returns the bytes removed.</summary>
    public static long DropTornTail(string path)
    {
        if (!File.Exists(path))
        {
            return 0;
        }
        using var fs = new FileStream(path, FileMode.Open, FileAccess.ReadWrite, FileShare.Read);
        long len = fs.Length;
        if (len == 0)
        {
            return 0;
        }
        long pos = len;
        var one = new byte[1];
        while (pos > 0)
        {
            fs.Position = pos - 1;
            _ = fs.Read(one, 0, 1);
            if (one[0] == (byte)'\n')
            {
                break;
            }
            pos--;
        }
        if (pos == len)
        {
            return 0;
        }
        fs.SetLength(pos);
        fs.Flush(flushToDisk: true);
        return len - pos;
    }

    /// <summary>Reads every whole record (for status, tests and tools).</summary>
    public static IReadOnlyList<ConfidenceRecord> ReadAll(string path)
    {
        var list = new List<ConfidenceRecord>();
        if (!File.Exists(path))
        {
            return list;
        }
        foreach (var line in File.ReadLines(path))
        {
            if (line.Length > 0)
            {
                list.Add(OutputJson.ReadConfidenceLine(line));
            }
        }
        return list;
    }
}
