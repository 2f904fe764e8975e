using System.Text.Json;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Installation;

/// <summary>install-service.ps1, parsed and dry-run with PowerShell 7.6.9 (dotnet-tools.json).</summary>
public class InstallScriptTests(ITestOutputHelper output)
{
    private static string ScriptPath => Path.Combine(RepoPaths.Root, "install-service.ps1");

    private bool PwshMissing()
    {
        if (PwshRunner.WhyUnavailable is not { } why)
        {
            return false;
        }
        Assert.False(RepoPaths.IsCi, why + " (required when CI=true)");
        output.WriteLine("skipped: " + why);
        return true;
    }

    [Fact]
    public void Parse_Script_HasNoErrorsAndSupportsShouldProcess()
    {
        if (PwshMissing())
        {
            return;
        }
        const string probe =
            """
            $tokens = $null; $errors = $null
            $ast = [System.Management.Automation.Language.Parser]::ParseFile($args[0], [ref]$tokens, [ref]$errors)
            $binding = $ast.ParamBlock.Attributes | Where-Object { $_.TypeName.Name -eq 'CmdletBinding' }
            $ssp = $binding.NamedArguments | Where-Object { $_.ArgumentName -eq 'SupportsShouldProcess' }
            $action = $ast.ParamBlock.Parameters | Where-Object { $_.Name.VariablePath.UserPath -eq 'Action' }
            $set = $action.Attributes | Where-Object { $_.TypeName.Name -eq 'ValidateSet' }
            $account = $ast.ParamBlock.Parameters | Where-Object { $_.Name.VariablePath.UserPath -eq 'Account' }
            $accounts = $account.Attributes | Where-Object { $_.TypeName.Name -eq 'ValidateSet' }
            [pscustomobject]@{
              Errors = @($errors | ForEach-Object { $_.Message })
              ShouldProcess = [string]$ssp.Argument.Extent.Text
              Actions = @($set.PositionalArguments | ForEach-Object { $_.Value })
              Accounts = @($accounts.PositionalArguments | ForEach-Object { $_.Value })
            } | ConvertTo-Json -Compress
            """;
        var (code, stdout, stderr) = PwshRunner.Run("-Command", $"& {{ {probe} }} '{ScriptPath}'");
        Assert.True(code == 0, stderr);
        using var json = JsonDocument.Parse(stdout);
        var root = json.RootElement;
        Assert.Empty(root.GetProperty("Errors").EnumerateArray());
        Assert.Equal("$true", root.GetProperty("ShouldProcess").GetString());
        Assert.Equal(["install", "uninstall", "status"], root.GetProperty("Actions").EnumerateArray().Select(e => e.GetString()));
        Assert.Contains("VirtualAccount", root.GetProperty("Accounts").EnumerateArray().Select(e => e.GetString()));
        Assert.Contains("User", root.GetProperty("Accounts").EnumerateArray().Select(e => e.GetString()));
    }

    [Fact]
    public void Install_WhatIf_PrintsEveryActionAndChangesNothing()
    {
        if (PwshMissing())
        {
            return;
        }
        string data = Path.Combine(Path.GetTempPath(), "sw-install-" + Guid.NewGuid().ToString("N"));
        var (code, stdout, stderr) = PwshRunner.Run("-File", ScriptPath, "install", "-WhatIf",
            "-BinaryPath", "/opt/sw/seamwright.exe", "-ConfigPath", "/opt/sw/appsettings.json", "-DataPath", data, "-Start");
        output.WriteLine(stdout);
        Assert.True(code == 0, stderr);
        string[] lines = WhatIfLines(stdout);
        Assert.Equal(
            [
                "Create service|New-Service -Name Seamwright -BinaryPathName '\"/opt/sw/seamwright.exe\" watch --config \"/opt/sw/appsettings.json\"' -DisplayName 'Seamwright image preparation' -StartupType AutomaticDelayedStart",
                "Set service account|sc.exe config Seamwright obj= \"NT SERVICE\\Seamwright\" start= delayed-auto",
                "Set recovery actions (restart on failure)|sc.exe failure Seamwright reset= 86400 actions= restart/10000/restart/60000/restart/300000",
                "Apply recovery actions to non-zero exits|sc.exe failureflag Seamwright 1",
                $"Create data folder|New-Item -ItemType Directory -Force -Path '{data}'",
                $"Grant the service account Modify rights on the data folder|icacls.exe \"{data}\" /grant \"NT SERVICE\\Seamwright:(OI)(CI)M\"",
                "Start service|Start-Service -Name Seamwright",
            ],
            lines);
        Assert.False(Directory.Exists(data), "-WhatIf must not create the data folder");
    }

    [Fact]
    public void Install_WhatIfWithChoices_UsesAccountStartTypeAndDelays()
    {
        if (PwshMissing())
        {
            return;
        }
        var (code, stdout, stderr) = PwshRunner.Run("-File", ScriptPath, "install", "-WhatIf", "-ServiceName", "SeamwrightB",
            "-Account", "NetworkService", "-StartupType", "Manual", "-RestartDelaySeconds", "5,30", "-ResetFailureCountSeconds", "3600",
            "-DataPath", "D:\\sw");
        Assert.True(code == 0, stderr);
        string[] lines = WhatIfLines(stdout);
        Assert.Contains("Set service account|sc.exe config SeamwrightB obj= \"NT AUTHORITY\\NetworkService\" start= demand", lines);
        Assert.Contains("Set recovery actions (restart on failure)|sc.exe failure SeamwrightB reset= 3600 actions= restart/5000/restart/30000", lines);
        Assert.DoesNotContain(lines, l => l.StartsWith("Start service", StringComparison.Ordinal));
    }

    [Fact]
    public void Uninstall_WhatIf_PrintsStopAndDelete()
    {
        if (PwshMissing())
        {
            return;
        }
        var (code, stdout, stderr) = PwshRunner.Run("-File", ScriptPath, "uninstall", "-WhatIf");
        Assert.True(code == 0, stderr);
        Assert.Equal(["Stop service|Stop-Service -Name Seamwright", "Delete service|sc.exe delete Seamwright"], WhatIfLines(stdout));
    }

    [Fact]
    public void Install_UserAccountWithoutCredential_FailsWithReason()
    {
        if (PwshMissing())
        {
            return;
        }
        var (code, stdout, stderr) = PwshRunner.Run("-File", ScriptPath, "install", "-WhatIf", "-Account", "User");
        Assert.NotEqual(0, code);
        Assert.Contains("-Credential", stderr + stdout, StringComparison.Ordinal);
        Assert.Empty(WhatIfLines(stdout));
    }

    [Fact]
    public void Install_WithoutWhatIfOffWindows_RefusesWithNonZeroExit()
    {
        if (OperatingSystem.IsWindows() || PwshMissing())
        {
            return;
        }
        var (code, stdout, stderr) = PwshRunner.Run("-File", ScriptPath, "install", "-BinaryPath", "/nonexistent/seamwright.exe");
        Assert.NotEqual(0, code);
        Assert.Contains("manages a Windows service", stderr + stdout, StringComparison.Ordinal);
    }

    /// <summary>"What if: Performing the operation "A" on target "B"." lines as "A|B".</summary>
    private static string[] WhatIfLines(string stdout)
    {
        const string head = "What if: Performing the operation \"";
        return stdout.Split('\n')
            .Select(l => l.TrimEnd('\r'))
            .Where(l => l.StartsWith(head, StringComparison.Ordinal))
            .Select(l =>
            {
                string rest = l[head.Length..];
                int split = rest.IndexOf("\" on target \"", StringComparison.Ordinal);
                return rest[..split] + "|" + rest[(split + "\" on target \"".Length)..^2];
            })
            .ToArray();
    }
}
