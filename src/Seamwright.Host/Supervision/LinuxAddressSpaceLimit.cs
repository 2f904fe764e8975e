using System.Globalization;
using System.Runtime.InteropServices;

namespace Seamwright.Host.Supervision;

/// <summary>
/// Caps the worker's address space with setrlimit(RLIMIT_AS) from inside the worker at start
/// (getrlimit(2)/setrlimit(2)). The runtime has already reserved its GC range by then, and a
/// reservation counts toward RLIMIT_AS, so the limit is set to the current size plus the job
/// budget: every later mapping (native buffers, thread stacks, the GC growing beyond its
/// reservation) then fails with ENOMEM once the budget minus what is already resident is used, which .NET surfaces as OutOfMemoryException.
/// </summary>
internal static partial class LinuxAddressSpaceLimit
{
    private const int RlimitAs = 9; // RLIMIT_AS on Linux (x86-64 and arm64)

    /// <summary>
    /// Address space the runtime reserves without using it (thread stacks, JIT code heaps, one
    /// glibc arena with MALLOC_ARENA_MAX=2): measured about 115 MiB of growth over a worker's
    /// first jobs on .NET 10 / Debian 12, doubled. The address-space limit is therefore loose by
    /// this much; it exists to stop single giant requests (a 2 GB pixel buffer), while the
    /// resident size is held by the GC hard limit, the allocator limit and the supervisor's poll.
    /// </summary>
    public const long ReservationSlackBytes = 256L << 20;

    [StructLayout(LayoutKind.Sequential)]
    private struct RLimit
    {
        public ulong Current;
        public ulong Maximum;
    }

    [LibraryImport("libc", EntryPoint = "setrlimit", SetLastError = true)]
    private static partial int SetRLimit(int resource, in RLimit limit);

    /// <summary>Applies the cap; returns a description of what was set, or why nothing was.</summary>
    public static string Apply(long budgetBytes)
    {
        if (!OperatingSystem.IsLinux())
        {
            return "rlimit: not Linux";
        }
        long current = CurrentVirtualBytes();
        if (current <= 0)
        {
            return "rlimit: /proc/self/status unreadable";
        }
        // What is already resident counts against the budget, so the resident size cannot pass
        // the budget by growing into new mappings.
        long resident = ProcStatusBytes("/proc/self/status", "VmRSS:");
        long headroom = Math.Max(budgetBytes - resident, 16L << 20) + ReservationSlackBytes;
        ulong limit = (ulong)(current + headroom);
        var value = new RLimit { Current = limit, Maximum = limit };
        if (SetRLimit(RlimitAs, value) != 0)
        {
            return "rlimit: setrlimit failed, errno " + Marshal.GetLastPInvokeError().ToString(CultureInfo.InvariantCulture);
        }
        return string.Create(CultureInfo.InvariantCulture, $"rlimit-as={limit >> 20}MiB (mapped {current >> 20}MiB + {headroom >> 20}MiB headroom; resident {resident >> 20}MiB)");
    }

    /// <summary>VmSize from /proc/self/status, in bytes; 0 when unavailable.</summary>
    public static long CurrentVirtualBytes() => ProcStatusBytes("/proc/self/status", "VmSize:");

    /// <summary>A "Name:   123 kB" line of a /proc status file, in bytes; 0 when absent.</summary>
    public static long ProcStatusBytes(string statusPath, string key)
    {
        try
        {
            foreach (string line in File.ReadLines(statusPath))
            {
                if (line.StartsWith(key, StringComparison.Ordinal))
                {
                    var parts = line[key.Length..].Split([' ', '\t'], StringSplitOptions.RemoveEmptyEntries);
                    return long.Parse(parts[0], CultureInfo.InvariantCulture) * 1024;
                }
            }
        }
        catch (IOException)
        {
        }
        catch (UnauthorizedAccessException)
        {
        }
        return 0;
    }
}
