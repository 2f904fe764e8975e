using System.Text.Json;
using Seamwright.Pipeline.Loading;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Supervision;

/// <summary>
/// The worker's job for a preview: open the image in colour through the <see cref="ImageLoader"/>
/// with the run's limits (sent as JSON), scaled down to the long side asked for, and write its
/// pixels (<see cref="PreviewPixels"/>) to the new file the supervisor names. A file the loader
/// rejects is a failed reply with its reason; the worker stays unless the decode ran out of
/// memory or time.
/// </summary>
internal sealed class PreviewJob(long allocationLimitBytes, TimeSpan jobTimeout) : IWorkerJob
{
    public WorkerReply Run(WorkerRequest request)
    {
        ArgumentNullException.ThrowIfNull(request.FeatureOutputPath);
        var limits = JsonSerializer.Deserialize<LimitSettings>(request.LimitsJson ?? "{}") ?? new LimitSettings();
        var loader = new ImageLoader(LoadLimits.From(limits) with
        {
            AllocationLimitMegabytes = (int)Math.Clamp(allocationLimitBytes >> 20, 16, 65536),
            // The supervisor's wall-clock limit kills the process first (as in DecodeJob).
            DecodeTimeout = jobTimeout * 2,
        });
        try
        {
            using var image = loader.LoadColour(request.Path, request.PreviewMaxSide);
            // A hand-off read once after the reply (and deleted by the service whatever happens):
            // no durability needed, so no flush to disk.
            using (var stream = new FileStream(request.FeatureOutputPath, FileMode.CreateNew, FileAccess.Write))
            {
                PreviewPixels.Write(stream, image);
            }
            return new WorkerReply(request.Id, true, null, image.Width, image.Height, null, "preview", 0, false);
        }
        catch (ImageLoadException ex)
        {
            bool recycle = ex.Failure is ImageLoadFailure.Timeout or ImageLoadFailure.MemoryLimit;
            return new WorkerReply(request.Id, false, ex.Reason, 0, 0, null, null, 0, recycle, 0, ex.Failure.ToString());
        }
    }
}
