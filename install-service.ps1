#Requires -Version 7.0
<#
.SYNOPSIS
    Installs, removes or reports the Seamwright Windows service.

.DESCRIPTION
    install   creates the service running `seamwright watch`, chooses its account, grants that
              account write access to the data folder, and sets recovery actions so Windows
              restarts the service when it fails (including when it exits with a non-zero code).
    uninstall stops and deletes the service. The data folder (ledger, logs, outputs) is kept.
    status    prints the service state, account, start type and recovery actions.

    Every change goes through ShouldProcess: -WhatIf prints each action (with the exact command
    line) without performing it, -Confirm asks before each one. The -WhatIf path also runs on
    Linux and macOS (for review and for the repository's tests); performing changes needs
    Windows and an elevated shell.

.EXAMPLE
    ./install-service.ps1 install -BinaryPath 'C:\Program Files\Seamwright\seamwright.exe' -WhatIf
.EXAMPLE
    ./install-service.ps1 install -Account User -Credential (Get-Credential CORP\svc-seamwright)
.EXAMPLE
    ./install-service.ps1 uninstall
#>
[CmdletBinding(SupportsShouldProcess = $true)]
param(
    [Parameter(Position = 0)]
    [ValidateSet('install', 'uninstall', 'status')]
    [string] $Action = 'status',

    [ValidatePattern('^[A-Za-z0-9_.-]{1,80}$')]
    [string] $ServiceName = 'Seamwright',

    [string] $DisplayName = 'Seamwright image preparation',

    # The published executable (dotnet publish src/Seamwright.Host -c Release -r win-x64).
    [string] $BinaryPath = (Join-Path $PSScriptRoot 'publish' 'seamwright.exe'),

    # Settings file passed to `seamwright watch --config`.
    [string] $ConfigPath = (Join-Path $PSScriptRoot 'config' 'appsettings.json'),

    # Folder for the ledger, logs and caches; the service account gets Modify rights on it.
    [string] $DataPath,

    # VirtualAccount = NT SERVICE\<name> (no password, least privilege; the default).
    # LocalService / NetworkService = the built-in low-privilege accounts.
    # LocalSystem = full machine rights (not recommended).
    # User = a domain or local account given with -Credential (needed for network shares
    #        that require a domain identity).
    [ValidateSet('VirtualAccount', 'LocalService', 'NetworkService', 'LocalSystem', 'User')]
    [string] $Account = 'VirtualAccount',

    [pscredential] $Credential,

    [ValidateSet('Automatic', 'AutomaticDelayedStart', 'Manual')]
    [string] $StartupType = 'AutomaticDelayedStart',

    # Delays before the first, second and later restarts after a failure (1 to 3 values).
    # Strings are accepted so that `pwsh -File ... -RestartDelaySeconds 5,30` works too.
    [string[]] $RestartDelaySeconds = @('10', '60', '300'),

    # Failure count resets after this many seconds without a failure.
    [ValidateRange(60, 2592000)]
    [int] $ResetFailureCountSeconds = 86400,

    # Start the service after installing it.
    [switch] $Start
)

Set-StrictMode -Version 3.0
$ErrorActionPreference = 'Stop'

$onWindows = [System.OperatingSystem]::IsWindows()

if (-not $DataPath) {
    # Off Windows only the -WhatIf plan is possible, so it shows the Windows default there too.
    $DataPath = if ($onWindows) {
        Join-Path ([Environment]::GetFolderPath([Environment+SpecialFolder]::CommonApplicationData)) 'Seamwright'
    }
    else { 'C:\ProgramData\Seamwright' }
}

function Get-AccountName {
    switch ($Account) {
        'VirtualAccount' { "NT SERVICE\$ServiceName" }
        'LocalService' { 'NT AUTHORITY\LocalService' }
        'NetworkService' { 'NT AUTHORITY\NetworkService' }
        'LocalSystem' { 'LocalSystem' }
        'User' { $Credential.UserName }
    }
}

# One change to the system. The command text is what an operator would type to do it by hand;
# -WhatIf prints it, otherwise the body runs. Windows-only cmdlets are only ever called from a
# body, so the -WhatIf path needs none of them.
function Invoke-Step {
    param(
        [Parameter(Mandatory)] [string] $Description,
        [Parameter(Mandatory)] [string] $CommandText,
        [Parameter(Mandatory)] [scriptblock] $Body
    )
    if ($PSCmdlet.ShouldProcess($CommandText, $Description)) {
        & $Body
    }
}

# sc.exe reports failure through its exit code only; turn that into an error.
function Invoke-Sc {
    param([Parameter(ValueFromRemainingArguments)] [string[]] $Arguments)
    $output = & sc.exe @Arguments 2>&1
    if ($LASTEXITCODE -ne 0) {
        throw "sc.exe $($Arguments -join ' ') failed with exit code ${LASTEXITCODE}: $output"
    }
    $output
}

function Assert-CanChange {
    if ($WhatIfPreference) { return }
    if (-not $onWindows) {
        throw 'install-service.ps1 manages a Windows service. On Linux install config/seamwright.service (see README); use -WhatIf here to review the Windows actions.'
    }
    $identity = [System.Security.Principal.WindowsIdentity]::GetCurrent()
    $principal = [System.Security.Principal.WindowsPrincipal]::new($identity)
    if (-not $principal.IsInRole([System.Security.Principal.WindowsBuiltInRole]::Administrator)) {
        throw 'Run this script from an elevated PowerShell (Run as administrator).'
    }
}

function Install-SeamwrightService {
    if ($Account -eq 'User' -and -not $Credential) {
        throw '-Account User needs -Credential (Get-Credential DOMAIN\name).'
    }
    if ($Account -ne 'User' -and $Credential) {
        throw "-Credential is only used with -Account User (the $Account account has no password)."
    }
    if (-not (Test-Path -LiteralPath $BinaryPath -PathType Leaf)) {
        if ($WhatIfPreference) { Write-Warning "BinaryPath '$BinaryPath' does not exist (continuing because of -WhatIf)." }
        else { throw "BinaryPath '$BinaryPath' does not exist; publish the Host first (dotnet publish src/Seamwright.Host -c Release -r win-x64 -o publish)." }
    }

    $delays = @($RestartDelaySeconds | ForEach-Object { $_ -split ',' } | Where-Object { $_ -ne '' } | ForEach-Object {
            $seconds = 0
            if (-not [int]::TryParse($_.Trim(), [ref]$seconds) -or $seconds -lt 1 -or $seconds -gt 86400) {
                throw "-RestartDelaySeconds: '$_' is not a whole number of seconds from 1 to 86400."
            }
            $seconds
        })
    if ($delays.Count -lt 1 -or $delays.Count -gt 3) { throw '-RestartDelaySeconds takes 1 to 3 delays.' }
    $actions = ($delays | ForEach-Object { "restart/$($_ * 1000)" }) -join '/'
    $commandLine = "`"$BinaryPath`" watch --config `"$ConfigPath`""
    $accountName = Get-AccountName
    $scStart = if ($StartupType -eq 'Manual') { 'demand' } elseif ($StartupType -eq 'Automatic') { 'auto' } else { 'delayed-auto' }
    $cmdletStart = if ($StartupType -eq 'AutomaticDelayedStart') { 'AutomaticDelayedStart' } else { $StartupType }

    Invoke-Step -Description 'Create service' `
        -CommandText "New-Service -Name $ServiceName -BinaryPathName '$commandLine' -DisplayName '$DisplayName' -StartupType $cmdletStart" `
        -Body {
            $parameters = @{
                Name           = $ServiceName
                BinaryPathName = $commandLine
                DisplayName    = $DisplayName
                StartupType    = $cmdletStart
                Description    = 'Watches folders and prepares overlapping images for stitching (transforms, tie points, confidence log).'
            }
            if ($Account -eq 'User') { $parameters.Credential = $Credential }
            New-Service @parameters | Out-Null
        }

    if ($Account -ne 'User') {
        # New-Service can only take a password credential; built-in and virtual accounts are set with sc.exe.
        Invoke-Step -Description 'Set service account' `
            -CommandText "sc.exe config $ServiceName obj= `"$accountName`" start= $scStart" `
            -Body { Invoke-Sc config $ServiceName obj= $accountName start= $scStart | Out-Null }
    }

    Invoke-Step -Description 'Set recovery actions (restart on failure)' `
        -CommandText "sc.exe failure $ServiceName reset= $ResetFailureCountSeconds actions= $actions" `
        -Body { Invoke-Sc failure $ServiceName reset= $ResetFailureCountSeconds actions= $actions | Out-Null }

    # Without this flag Windows runs recovery actions only when the process dies, not when the
    # service stops itself with a non-zero exit code (which is how Seamwright reports a fatal error).
    Invoke-Step -Description 'Apply recovery actions to non-zero exits' `
        -CommandText "sc.exe failureflag $ServiceName 1" `
        -Body { Invoke-Sc failureflag $ServiceName 1 | Out-Null }

    Invoke-Step -Description 'Create data folder' `
        -CommandText "New-Item -ItemType Directory -Force -Path '$DataPath'" `
        -Body { New-Item -ItemType Directory -Force -Path $DataPath | Out-Null }

    Invoke-Step -Description 'Grant the service account Modify rights on the data folder' `
        -CommandText "icacls.exe `"$DataPath`" /grant `"${accountName}:(OI)(CI)M`"" `
        -Body {
            & icacls.exe $DataPath /grant "${accountName}:(OI)(CI)M" | Out-Null
            if ($LASTEXITCODE -ne 0) { throw "icacls.exe failed with exit code $LASTEXITCODE" }
        }

    if ($Start) {
        Invoke-Step -Description 'Start service' -CommandText "Start-Service -Name $ServiceName" `
            -Body { Start-Service -Name $ServiceName }
    }
}

function Uninstall-SeamwrightService {
    if (-not $WhatIfPreference -and -not (Get-Service -Name $ServiceName -ErrorAction SilentlyContinue)) {
        Write-Output "Service '$ServiceName' is not installed; nothing to do."
        return
    }
    Invoke-Step -Description 'Stop service' -CommandText "Stop-Service -Name $ServiceName" `
        -Body { Stop-Service -Name $ServiceName -ErrorAction SilentlyContinue }
    Invoke-Step -Description 'Delete service' -CommandText "sc.exe delete $ServiceName" `
        -Body { Invoke-Sc delete $ServiceName | Out-Null }
    Write-Output "The data folder '$DataPath' (ledger, logs, caches) is kept; delete it by hand if no longer needed."
}

function Show-SeamwrightServiceStatus {
    if (-not $onWindows) {
        Write-Output "status: the Windows service manager is not available on this system. On Linux: systemctl status seamwright; seamwright status."
        return
    }
    $service = Get-Service -Name $ServiceName -ErrorAction SilentlyContinue
    if (-not $service) {
        Write-Output "Service '$ServiceName' is not installed."
        return
    }
    $wmi = Get-CimInstance -ClassName Win32_Service -Filter "Name='$ServiceName'"
    Write-Output "Service:   $ServiceName ($($service.DisplayName))"
    Write-Output "State:     $($service.Status)"
    Write-Output "Start:     $($service.StartType)"
    Write-Output "Account:   $($wmi.StartName)"
    Write-Output "Command:   $($wmi.PathName)"
    Write-Output 'Recovery:'
    & sc.exe qfailure $ServiceName | Where-Object { $_ -match '\S' } | ForEach-Object { "  $_" }
    & sc.exe qfailureflag $ServiceName | Where-Object { $_ -match 'FAILURE_ACTIONS_ON_NONCRASH_FAILURES' } | ForEach-Object { "  $($_.Trim())" }
}

switch ($Action) {
    'install' { Assert-CanChange; Install-SeamwrightService }
    'uninstall' { Assert-CanChange; Uninstall-SeamwrightService }
    'status' { Show-SeamwrightServiceStatus }
}
