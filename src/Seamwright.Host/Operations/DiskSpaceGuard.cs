using System.Globalization;

namespace Seamwright.Host.Operations;

/// <summary>Free bytes on the volume holding a path (injected in tests).</summary>
internal interface IFreeSpaceProbe
{
    long FreeBytes(string path);
}

internal sealed class DriveFreeSpaceProbe : IFreeSpaceProbe
{
    public long FreeBytes(string path) => new DriveInfo(Path.GetFullPath(path)).AvailableFreeSpace;
}

/// <summary>
/// Pauses intake while any output volume has less free space than the threshold and resumes
/// once all have the threshold plus a margin (the margin keeps it from flapping around the
/// line). Intake loops wait on <see cref="WaitUntilOpenAsync"/> before taking new work; work
/// in progress finishes. Thread-safe.
/// </summary>
internal sealed class DiskSpaceGuard(IFreeSpaceProbe probe, IReadOnlyList<string> outputPaths, long pauseBelowBytes, long resumeMarginBytes)
{
    private readonly Lock _gate = new();
    private TaskCompletionSource _open = NewOpen(open: true);

    public bool Paused { get; private set; }

    /// <summary>Why intake is paused, in words; null while open.</summary>
    public string? PauseReason { get; private set; }

    /// <summary>Probes every output path; returns the state change in words (for the log), or null when none.</summary>
    public string? Check()
    {
        var free = outputPaths.Select(p => (Path: p, Free: probe.FreeBytes(p))).ToList();
        var low = free.Where(f => f.Free < pauseBelowBytes).ToList();
        lock (_gate)
        {
            if (!Paused && low.Count > 0)
            {
                Paused = true;
                PauseReason = string.Join("; ", low.Select(l => string.Create(CultureInfo.InvariantCulture,
                    $"intake paused: {l.Free >> 20} MiB free on the volume of {l.Path}, below the {pauseBelowBytes >> 20} MiB threshold; free space to resume")));
                _open = NewOpen(open: false);
                return PauseReason;
            }
            if (Paused && free.All(f => f.Free >= pauseBelowBytes + resumeMarginBytes))
            {
                Paused = false;
                PauseReason = null;
                _open.TrySetResult();
                return string.Create(CultureInfo.InvariantCulture,
                    $"intake resumed: at least {(pauseBelowBytes + resumeMarginBytes) >> 20} MiB free on every output volume");
            }
            return null;
        }
    }

    /// <summary>Completes at once while open; otherwise when intake resumes.</summary>
    public Task WaitUntilOpenAsync(CancellationToken cancellationToken)
    {
        lock (_gate)
        {
            return _open.Task.WaitAsync(cancellationToken);
        }
    }

    private static TaskCompletionSource NewOpen(bool open)
    {
        var tcs = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        if (open)
        {
            tcs.SetResult();
        }
        return tcs;
    }
}
