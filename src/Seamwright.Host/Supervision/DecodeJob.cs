using System.Globalization;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Loading;
using Seamwright.Pipeline.Output;

namespace Seamwright.Host.Supervision;

/// <summary>
/// The worker's job: load the image with the Pipeline's <see cref="ImageLoader"/> (size cap,
/// signature, structure check, header-only pixel budget, allocation-limited decode) and extract
/// its features. The reply is compact (size, format, feature count); the features themselves
/// go to the feature cache file the supervisor names, when it names one.
/// </summary>
internal sealed class DecodeJob(long allocationLimitBytes, TimeSpan jobTimeout, FeatureSettings? features = null) : IWorkerJob
{
    private readonly FeatureSettings _features = features ?? FeatureSettings.Default;
    private readonly Dictionary<(long, long), ImageLoader> _loaders = [];

    public WorkerReply Run(WorkerRequest request)
    {
        var loader = LoaderFor(request);
        LoadedImage image;
        try
        {
            image = loader.Load(request.Path);
        }
        catch (ImageLoadException ex)
        {
            // A loader time-out leaves a decoding thread running; a fresh worker is cheaper than its CPU.
            bool recycle = ex.Failure is ImageLoadFailure.Timeout or ImageLoadFailure.MemoryLimit;
            return new WorkerReply(request.Id, false, ex.Reason, 0, 0, null, null, 0, recycle, 0, ex.Failure.ToString());
        }
        var extracted = ImageFeatureExtractor.Extract(image.Image, null, _features);
        if (request.FeatureOutputPath is { } output)
        {
            AtomicFile.Write(output, stream => FeatureCacheCodec.Write(stream, extracted));
        }
        return new WorkerReply(request.Id, true, null, image.DisplaySize.Width, image.DisplaySize.Height, image.Format.ToString(),
            string.Create(CultureInfo.InvariantCulture, $"{extracted.Count} features at working size {extracted.WorkingSize.Width}x{extracted.WorkingSize.Height}"),
            0, false, extracted.Count);
    }

    private ImageLoader LoaderFor(WorkerRequest request)
    {
        var key = (request.MaxFileBytes, request.MaxPixels);
        if (!_loaders.TryGetValue(key, out var loader))
        {
            loader = new ImageLoader(new LoadLimits
            {
                MaxFileBytes = request.MaxFileBytes,
                MaxPixels = request.MaxPixels,
                AllocationLimitMegabytes = (int)Math.Clamp(allocationLimitBytes >> 20, 16, 65536),
                // The supervisor's wall-clock limit kills the whole process; the loader's own
                // limit stays behind it so the kill, not an abandoned thread, is what ends a hang.
                DecodeTimeout = jobTimeout * 2,
            });
            _loaders[key] = loader;
        }
        return loader;
    }
}
