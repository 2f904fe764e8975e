using System.Runtime.InteropServices;

namespace Seamwright.Benchmarks;

/// <summary>
/// CPU time of the calling thread (Linux clock_gettime with CLOCK_THREAD_CPUTIME_ID, nanosecond
/// resolution): on a shared, loaded machine it tracks the work done far better than wall time.
/// Returns NaN where the call is unavailable.
/// </summary>
internal static class ThreadCpuClock
{
    private const int ClockThreadCpuTimeId = 3;

    [StructLayout(LayoutKind.Sequential)]
    private struct TimeSpec
    {
        public long Seconds;
        public long Nanoseconds;
    }

    [DllImport("libc", EntryPoint = "clock_gettime")]
    [DefaultDllImportSearchPaths(DllImportSearchPath.SafeDirectories)]
    private static extern int ClockGetTime(int clockId, out TimeSpec time);

    public static double NowMilliseconds()
    {
        if (!OperatingSystem.IsLinux())
        {
            return double.NaN;
        }
        return ClockGetTime(ClockThreadCpuTimeId, out var t) == 0 ? t.Seconds * 1e3 + t.Nanoseconds * 1e-6 : double.NaN;
    }
}
