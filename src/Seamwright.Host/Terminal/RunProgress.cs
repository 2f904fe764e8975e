using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Processing;
using Serilog;
using Spectre.Console;

namespace Seamwright.Host.Terminal;

/// <summary>
/// Reports set processing of a one-shot run: a live Spectre.Console progress display on a
/// terminal, plain lines when the output is redirected, and every event to the log.
/// </summary>
internal sealed class RunProgress(ILogger log, bool interactive) : IProcessingObserver
{
    private readonly object _gate = new();
    private readonly Dictionary<string, ProgressTask> _tasks = new(StringComparer.Ordinal);
    private ProgressContext? _progress;

    public bool Interactive => interactive;

    public static bool TerminalIsInteractive() =>
        !System.Console.IsOutputRedirected && AnsiConsole.Profile.Capabilities.Interactive;

    /// <summary>Runs <paramref name="work"/> under a live display (terminal) or plainly.</summary>
    public void Run(Action work)
    {
        if (!interactive)
        {
            work();
            return;
        }
        AnsiConsole.Progress()
            .AutoClear(false)
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new ElapsedTimeColumn())
            .Start(ctx =>
            {
                _progress = ctx;
                work();
            });
    }

    public void SetStarted(string setId, long runId, int images)
    {
        log.Information("Set {Set}: run {Run} started with {Images} images", setId, runId, images);
        lock (_gate)
        {
            if (_progress is not null)
            {
                _tasks[setId] = _progress.AddTask(Markup.Escape(setId), maxValue: Math.Max(1, images));
            }
            else
            {
                System.Console.Out.WriteLine($"{setId}: run {runId}, {images} images");
            }
        }
    }

    public void ImageDone(string setId, string image, bool fromCache)
    {
        log.Debug("Set {Set}: image {Image} analysed (from cache: {FromCache})", setId, image, fromCache);
        Step(setId);
    }

    public void BadFile(string setId, string image, string reason)
    {
        log.Warning("Set {Set}: bad file {Image}: {Reason}", setId, image, reason);
        lock (_gate)
        {
            if (_progress is null)
            {
                System.Console.Out.WriteLine($"{setId}: bad file {image}: {reason}");
            }
        }
        Step(setId);
    }

    public void PairsPlanned(string setId, int pairs)
    {
        log.Information("Set {Set}: {Pairs} pairs planned", setId, pairs);
        lock (_gate)
        {
            if (_tasks.TryGetValue(setId, out var t))
            {
                t.MaxValue += pairs;
            }
        }
    }

    public void PairDone(string setId, string imageA, string imageB, PairStatus status, IReadOnlyList<string> reasons)
    {
        log.Debug("Set {Set}: pair {A} / {B}: {Status} ({Reasons})", setId, imageA, imageB, status, string.Join("; ", reasons));
        Step(setId);
    }

    public void PairsCounted(string setId, int estimated, int reused) =>
        log.Information("Set {Set}: {Estimated} pairs estimated, {Reused} reused from the pair cache", setId, estimated, reused);

    public void AlignmentTimed(string setId, AlignmentTimes times)
    {
        ArgumentNullException.ThrowIfNull(times);
        log.Information("Set {Set}: set model and alignment {SetModelMs} ms (overlap planning {PlanningMs} ms, final alignment {AlignMs} ms), preview and report {VisualsMs} ms",
            setId, Math.Round(times.SetModelMs), Math.Round(times.OverlapPlanningMs), Math.Round(times.AlignMs), Math.Round(times.VisualsMs));
    }

    public void SecondLooks(string setId, int estimated, int reused, int decidedByScaleSpace) =>
        log.Information("Set {Set}: second look with scale-space features for {Pairs} undecided pairs ({Reused} reused from the pair cache); {Decided} decided by them",
            setId, estimated + reused, reused, decidedByScaleSpace);

    public void SetFinished(SetOutcome outcome)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        string line = Describe(outcome);
        if (outcome.Kind == SetOutcomeKind.Done)
        {
            log.Information("Set {Set}: {Outcome}", outcome.SetId, line);
        }
        else
        {
            log.Warning("Set {Set}: {Outcome}", outcome.SetId, line);
        }
        lock (_gate)
        {
            if (_tasks.TryGetValue(outcome.SetId, out var t))
            {
                t.Value = t.MaxValue;
                t.StopTask();
            }
            else
            {
                System.Console.Out.WriteLine($"{outcome.SetId}: {line}");
            }
        }
    }

    public static string Describe(SetOutcome o) => o.Kind switch
    {
        SetOutcomeKind.Done when o.Summary is { } s =>
            $"done (run {o.RunId}): {s.Images} images, {s.Pairs} pairs ({s.Accepted} accepted, {s.Weak} weak, {s.Rejected} rejected), {s.BadFiles} bad files" + (s.Incomplete ? ", incomplete" : ""),
        SetOutcomeKind.Unchanged => "unchanged since its last run",
        SetOutcomeKind.Deferred => "not processed now: " + o.Reason,
        SetOutcomeKind.Changed => "an input changed during the run; it will be redone: " + o.Reason,
        _ => "failed: " + o.Reason,
    };

    private void Step(string setId)
    {
        lock (_gate)
        {
            if (_tasks.TryGetValue(setId, out var t))
            {
                t.Increment(1);
            }
        }
    }
}
