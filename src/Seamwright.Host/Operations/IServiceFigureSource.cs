namespace Seamwright.Host.Operations;

/// <summary>The figures only the service's own loops know; the service implements this.</summary>
internal interface IServiceFigureSource
{
    /// <summary>Sets complete and waiting for a worker.</summary>
    int QueueDepth { get; }

    /// <summary>Sets waiting past their maximum wait, each described in words.</summary>
    IReadOnlyList<string> StuckSets();

    /// <summary>Quarantined files, each "path: reason".</summary>
    IReadOnlyList<string> Quarantined();

    /// <summary>Sets waiting for files to settle (quiet period) or for their completion rule, each in words.</summary>
    IReadOnlyList<string> Waiting();
}

internal sealed class NoServiceFigures : IServiceFigureSource
{
    public int QueueDepth => 0;

    public IReadOnlyList<string> StuckSets() => [];

    public IReadOnlyList<string> Quarantined() => [];

    public IReadOnlyList<string> Waiting() => [];
}
