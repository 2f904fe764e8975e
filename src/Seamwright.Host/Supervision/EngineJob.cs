using System.Text.Json;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Supervision;

/// <summary>
/// The worker's job when the service names a pair engine: that engine's analysis (loader with
/// limits, features, coarse signature) with the service's settings, written to the requested
/// cache file in the engine's own encoding. A file the engine rejects is a failed reply with
/// the engine's reason; the worker stays.
/// </summary>
internal sealed class EngineJob(long budgetBytes) : IWorkerJob
{
    private readonly Dictionary<string, IPairEngine> _engines = new(StringComparer.Ordinal);
    private readonly MemoryBudget _budget = new(Math.Max(1, budgetBytes));

    public WorkerReply Run(WorkerRequest request)
    {
        ArgumentNullException.ThrowIfNull(request.Engine);
        if (!_engines.TryGetValue(request.Engine, out var engine))
        {
            _engines[request.Engine] = engine = EngineFactory.Create(request.Engine);
        }
        var features = JsonSerializer.Deserialize<FeatureSettings>(request.FeaturesJson ?? "{}") ?? new FeatureSettings();
        var limits = JsonSerializer.Deserialize<LimitSettings>(request.LimitsJson ?? "{}") ?? new LimitSettings();
        ImageAnalysis analysis;
        try
        {
            analysis = engine.Analyze(request.Path, features, limits, _budget, CancellationToken.None);
        }
        catch (ImageRejectedException ex)
        {
            bool memory = ex.InnerException is Pipeline.Loading.ImageLoadException { Failure: Pipeline.Loading.ImageLoadFailure.MemoryLimit or Pipeline.Loading.ImageLoadFailure.Timeout };
            return new WorkerReply(request.Id, false, ex.Message, 0, 0, null, null, 0, memory, 0,
                (ex.InnerException as Pipeline.Loading.ImageLoadException)?.Failure.ToString() ?? "Rejected");
        }
        if (request.FeatureOutputPath is { } output)
        {
            AtomicFile.WriteAllBytes(output, engine.Encode(analysis));
        }
        return new WorkerReply(request.Id, true, null, analysis.Size.Width, analysis.Size.Height, null, engine.Name, 0, false);
    }
}

/// <summary>Routes a request: a preview to the preview job, one naming an engine to the engine job, else to the default decode job.</summary>
internal sealed class WorkerJobs(IWorkerJob engineJob, IWorkerJob decodeJob, IWorkerJob previewJob) : IWorkerJob
{
    public WorkerReply Run(WorkerRequest request) =>
        request.PreviewMaxSide > 0 ? previewJob.Run(request) : request.Engine is null ? decodeJob.Run(request) : engineJob.Run(request);
}
