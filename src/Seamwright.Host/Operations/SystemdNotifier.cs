using System.Globalization;
using System.Net.Sockets;
using System.Text;

namespace Seamwright.Host.Operations;

/// <summary>
/// Sends sd_notify messages (READY=1, WATCHDOG=1, STATUS=..., STOPPING=1) as datagrams to the
/// socket systemd names in $NOTIFY_SOCKET. UseSystemd already sends READY and STOPPING; the
/// watchdog heartbeat is ours, because only the service knows whether its loops are alive.
/// Protocol: sd_notify(3) and systemd.service(5), WatchdogSec=.
/// </summary>
internal sealed class SystemdNotifier : IDisposable
{
    private readonly Socket _socket;
    private readonly UnixDomainSocketEndPoint _endPoint;

    private SystemdNotifier(string socketPath)
    {
        // A leading '@' names a socket in the abstract namespace (a leading NUL byte).
        string path = socketPath[0] == '@' ? "\0" + socketPath[1..] : socketPath;
        _endPoint = new UnixDomainSocketEndPoint(path);
        _socket = new Socket(AddressFamily.Unix, SocketType.Dgram, ProtocolType.Unspecified);
    }

    /// <summary>A notifier for $NOTIFY_SOCKET, or null when not started by systemd (or not on Linux).</summary>
    public static SystemdNotifier? FromEnvironment() => Create(Environment.GetEnvironmentVariable("NOTIFY_SOCKET"));

    public static SystemdNotifier? Create(string? socketPath) =>
        OperatingSystem.IsLinux() && !string.IsNullOrEmpty(socketPath) ? new SystemdNotifier(socketPath) : null;

    /// <summary>
    /// Half the watchdog interval systemd expects (WATCHDOG_USEC), when WATCHDOG_PID is absent or
    /// names this process; null when the watchdog is off. Half leaves room for a late tick
    /// (sd_watchdog_enabled(3) recommends sending at half the interval).
    /// </summary>
    public static TimeSpan? WatchdogPeriod(string? watchdogUsec, string? watchdogPid, int currentPid)
    {
        if (!long.TryParse(watchdogUsec, NumberStyles.None, CultureInfo.InvariantCulture, out long usec) || usec <= 0)
        {
            return null;
        }
        if (!string.IsNullOrEmpty(watchdogPid)
            && (!int.TryParse(watchdogPid, NumberStyles.None, CultureInfo.InvariantCulture, out int pid) || pid != currentPid))
        {
            return null;
        }
        return TimeSpan.FromMicroseconds(usec / 2.0);
    }

    public static TimeSpan? WatchdogPeriodFromEnvironment() =>
        WatchdogPeriod(Environment.GetEnvironmentVariable("WATCHDOG_USEC"), Environment.GetEnvironmentVariable("WATCHDOG_PID"), Environment.ProcessId);

    /// <summary>Sends one message; false when the socket refused it (systemd gone): never throws.</summary>
    public bool Notify(string state)
    {
        try
        {
            return _socket.SendTo(Encoding.UTF8.GetBytes(state), _endPoint) > 0;
        }
        catch (SocketException)
        {
            return false;
        }
    }

    /// <summary>One-line STATUS= text (newlines would start a new assignment).</summary>
    public bool Status(string text) => Notify("STATUS=" + text.ReplaceLineEndings(" "));

    public void Dispose() => _socket.Dispose();
}
