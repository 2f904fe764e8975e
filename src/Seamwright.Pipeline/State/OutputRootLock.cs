namespace Seamwright.Pipeline.State;

/// <summary>
/// An exclusive lock on an output root, so only one instance serves it. Held as an open file with
/// no sharing (an advisory flock on Unix, a share-mode lock on Windows); the operating system
/// releases it when the process dies, so a crash never leaves a stale lock behind.
/// </summary>
public sealed class OutputRootLock : IDisposable
{
    private readonly FileStream _stream;

    private OutputRootLock(FileStream stream) => _stream = stream;

    public static OutputRootLock Acquire(string outputRoot)
    {
        string dir = Path.Combine(outputRoot, StateStore.StateFolder);
        Directory.CreateDirectory(dir);
        string path = Path.Combine(dir, "lock");
        try
        {
            var fs = new FileStream(path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
            fs.SetLength(0);
            byte[] pid = System.Text.Encoding.ASCII.GetBytes(Environment.ProcessId.ToString(System.Globalization.CultureInfo.InvariantCulture) + "\n");
            fs.Write(pid);
            fs.Flush();
            return new OutputRootLock(fs);
        }
        catch (IOException e)
        {
            throw new OutputRootBusyException($"Another Seamwright instance is serving the output root {outputRoot} (lock file {path}).", e);
        }
    }

    public void Dispose() => _stream.Dispose();
}

/// <summary>The output root is locked by another instance.</summary>
public sealed class OutputRootBusyException : Exception
{
    public OutputRootBusyException() { }

    public OutputRootBusyException(string message) : base(message) { }

    public OutputRootBusyException(string message, Exception inner) : base(message, inner) { }
}
