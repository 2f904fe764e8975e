using System.Diagnostics;
using System.Globalization;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Installation;

/// <summary>config/seamwright.service: checked by systemd-analyze where present, and key by key.</summary>
public class SystemdUnitTests(ITestOutputHelper output)
{
    private static string UnitPath => Path.Combine(RepoPaths.Root, "config", "seamwright.service");

    /// <summary>HostOptions.ShutdownTimeout default (docs/RELIABILITY.md, "Generic Host").</summary>
    private static readonly TimeSpan HostShutdownTimeout = TimeSpan.FromSeconds(30);

    [Fact]
    public void Verify_Unit_SystemdAnalyzeReportsNothing()
    {
        string? analyzer = new[] { "/usr/bin/systemd-analyze", "/bin/systemd-analyze" }.FirstOrDefault(File.Exists);
        if (analyzer is null)
        {
            output.WriteLine("skipped: systemd-analyze is not installed on this machine");
            return;
        }
        // The installed binary path does not exist on a build machine; verify checks that
        // ExecStart is executable, so point it at one that is. Everything else is verified as written.
        string dir = Directory.CreateTempSubdirectory("sw-unit-").FullName;
        try
        {
            string unit = Path.Combine(dir, "seamwright.service");
            File.WriteAllText(unit, File.ReadAllText(UnitPath).Replace("ExecStart=/opt/seamwright/seamwright", "ExecStart=/bin/true", StringComparison.Ordinal));
            var start = new ProcessStartInfo(analyzer) { RedirectStandardError = true, RedirectStandardOutput = true, WorkingDirectory = dir };
            start.ArgumentList.Add("verify");
            start.ArgumentList.Add(unit);
            start.Environment["SYSTEMD_LOG_COLOR"] = "0";
            using var process = Process.Start(start)!;
            string stdout = process.StandardOutput.ReadToEnd();
            string stderr = process.StandardError.ReadToEnd();
            process.WaitForExit();
            output.WriteLine(stdout + stderr);
            Assert.Equal(0, process.ExitCode);
            // Unknown keys and bad values are warnings with exit code 0, so the text must be empty too.
            Assert.DoesNotContain("seamwright.service", stderr, StringComparison.Ordinal);
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void Keys_Unit_RestartsWatchesAndHardens()
    {
        var service = ReadSection("Service");
        Assert.Equal("notify", service["Type"]);
        Assert.Equal("on-failure", service["Restart"]);
        Assert.Contains(" watch ", service["ExecStart"], StringComparison.Ordinal);
        Assert.True(Seconds(service["WatchdogSec"]) >= 10, "watchdog interval");
        Assert.True(Seconds(service["TimeoutStopSec"]) > HostShutdownTimeout.TotalSeconds, "TimeoutStopSec must exceed the host ShutdownTimeout");
        Assert.NotEqual("root", service["User"]);
        Assert.Equal("strict", service["ProtectSystem"]);
        Assert.True(service.ContainsKey("ReadWritePaths"));
        foreach (string yes in new[] { "NoNewPrivileges", "PrivateTmp", "PrivateDevices", "ProtectKernelTunables", "RestrictSUIDSGID" })
        {
            Assert.Equal("yes", service[yes]);
        }
        Assert.Equal(string.Empty, service["CapabilityBoundingSet"]);
        Assert.Contains("AF_UNIX", service["RestrictAddressFamilies"], StringComparison.Ordinal);
        Assert.Equal("multi-user.target", ReadSection("Install")["WantedBy"]);
    }

    [Fact]
    public void Unit_SettingsItCites_ExistInTheShippedSettingsAndLogsLandInItsFolders()
    {
        string unit = File.ReadAllText(Path.Combine(RepoPaths.Root, "config", "seamwright.service"));
        using var settings = System.Text.Json.JsonDocument.Parse(File.ReadAllText(Path.Combine(RepoPaths.Root, "config", "appsettings.json")));
        var cited = System.Text.RegularExpressions.Regex.Matches(unit, @"\b(?:Seamwright|Host|Serilog):[A-Za-z:]+").Select(m => m.Value).Distinct().ToList();
        Assert.NotEmpty(cited);
        foreach (string key in cited)
        {
            var node = settings.RootElement;
            foreach (string part in key.Split(':'))
            {
                Assert.True(node.ValueKind == System.Text.Json.JsonValueKind.Object && node.TryGetProperty(part, out node), $"the unit cites {key}, which config/appsettings.json does not have");
            }
        }
        var service = ReadSection("Service");
        // The shipped log path is relative, so logs land under WorkingDirectory; a LogsDirectory= the logs never reach misleads.
        string logPath = settings.RootElement.GetProperty("Serilog").GetProperty("WriteTo").EnumerateArray()
            .First(s => s.GetProperty("Name").GetString() == "File").GetProperty("Args").GetProperty("path").GetString()!;
        Assert.False(Path.IsPathRooted(logPath));
        Assert.False(service.ContainsKey("LogsDirectory"), "LogsDirectory= names a folder the logs never reach");
        Assert.Equal("/var/lib/" + service["StateDirectory"], service["WorkingDirectory"]);
        Assert.Equal("2", service["RestartPreventExitStatus"]);
    }

    [Fact]
    public void Sysusers_DedicatedUser_MatchesUnitUser()
    {
        string user = ReadSection("Service")["User"];
        string line = File.ReadLines(Path.Combine(RepoPaths.Root, "config", "seamwright.sysusers.conf")).Single(l => l.StartsWith("u ", StringComparison.Ordinal));
        Assert.Equal(user, line.Split(' ', StringSplitOptions.RemoveEmptyEntries)[1]);
    }

    private static Dictionary<string, string> ReadSection(string name)
    {
        var keys = new Dictionary<string, string>(StringComparer.Ordinal);
        string? section = null;
        foreach (string raw in File.ReadLines(UnitPath))
        {
            string line = raw.Trim();
            if (line.Length == 0 || line[0] is '#' or ';')
            {
                continue;
            }
            if (line[0] == '[')
            {
                section = line[1..^1];
                continue;
            }
            if (section != name)
            {
                continue;
            }
            int eq = line.IndexOf('=', StringComparison.Ordinal);
            string key = line[..eq];
            Assert.False(keys.ContainsKey(key) && key != "Environment", $"duplicate key {key}");
            keys[key] = line[(eq + 1)..];
        }
        return keys;
    }

    private static double Seconds(string value) =>
        value.EndsWith("min", StringComparison.Ordinal) ? 60 * double.Parse(value[..^3], CultureInfo.InvariantCulture)
        : value.EndsWith('s') ? double.Parse(value[..^1], CultureInfo.InvariantCulture)
        : double.Parse(value, CultureInfo.InvariantCulture);
}
