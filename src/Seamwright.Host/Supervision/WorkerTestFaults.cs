using System.Runtime.InteropServices;

namespace Seamwright.Host.Supervision;

/// <summary>
/// TEST-ONLY fault injection for the supervision tests: makes the worker crash, hang or grow
/// its memory when asked to decode a file with a given name, so the tests can prove that the
/// supervisor kills, replaces and quarantines. Active only when BOTH environment variables
/// SEAMWRIGHT_TEST_HOOKS=1 and SEAMWRIGHT_TEST_FAULTS are set on the worker (the supervisor
/// never sets them from configuration); the worker then says so on stderr at start.
/// SEAMWRIGHT_TEST_FAULTS: "crash:NAME;hang:NAME;grow:NAME" (file names, ';' separated).
/// </summary>
internal sealed class WorkerTestFaults
{
    private readonly Dictionary<string, string> _byName;

    private WorkerTestFaults(Dictionary<string, string> byName) => _byName = byName;

    public static WorkerTestFaults? FromEnvironment()
    {
        if (Environment.GetEnvironmentVariable("SEAMWRIGHT_TEST_HOOKS") != "1"
            || Environment.GetEnvironmentVariable("SEAMWRIGHT_TEST_FAULTS") is not { Length: > 0 } spec)
        {
            return null;
        }
        var byName = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (string item in spec.Split(';', StringSplitOptions.RemoveEmptyEntries))
        {
            int colon = item.IndexOf(':', StringComparison.Ordinal);
            if (colon > 0)
            {
                byName[item[(colon + 1)..]] = item[..colon];
            }
        }
        return new WorkerTestFaults(byName);
    }

    public int Count => _byName.Count;

    /// <summary>
    /// The two variables, for a supervisor to hand on to its workers, when this process itself
    /// was started with them (the service's integration tests); null otherwise.
    /// </summary>
    public static Dictionary<string, string>? PassThrough() =>
        FromEnvironment() is null ? null : new Dictionary<string, string>
        {
            ["SEAMWRIGHT_TEST_HOOKS"] = "1",
            ["SEAMWRIGHT_TEST_FAULTS"] = Environment.GetEnvironmentVariable("SEAMWRIGHT_TEST_FAULTS")!,
        };

    /// <summary>Misbehaves when the file is named in the spec; returns otherwise.</summary>
    public void Apply(string path)
    {
        if (!_byName.TryGetValue(Path.GetFileName(path), out string? fault))
        {
            return;
        }
        switch (fault)
        {
            case "crash":
                Environment.FailFast("test fault: crash on " + Path.GetFileName(path));
                break;
            case "hang":
                Thread.Sleep(Timeout.Infinite);
                break;
            case "grow":
                Grow();
                break;
        }
    }

    /// <summary>Allocates and touches native memory in 16 MiB steps until something stops it.</summary>
    private static unsafe void Grow()
    {
        var blocks = new List<IntPtr>();
        while (true)
        {
            const int step = 16 << 20;
            byte* block = (byte*)NativeMemory.Alloc(step);
            for (int i = 0; i < step; i += 4096)
            {
                block[i] = 1;
            }
            blocks.Add((IntPtr)block);
        }
    }
}
