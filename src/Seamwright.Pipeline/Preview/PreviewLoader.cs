using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Loading;
using Seamwright.Pipeline.Settings;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Preview;

/// <summary>
/// Opens a set's images in colour for the preview and the report's thumbnails, in this process,
/// through the <see cref="ImageLoader"/> with the run's limits (size, signature, structure,
/// header pixel budget, allocation cap, time-out), upright as displayed and scaled down to the
/// long side asked for. Each decode reserves its pixels in the shared memory budget like any
/// other decode. A file that fails to load gives null: a missing tile in a preview is not worth
/// a failed set (the analysis already reported a bad file). The service opens them in its
/// supervised workers instead (<see cref="IPairEngine.PreviewOpener"/>).
/// </summary>
public sealed class PreviewLoader(IReadOnlyList<string> paths, LimitSettings limits, MemoryBudget budget)
{
    private readonly ImageLoader _loader = new(LoadLimits.From(limits));

    public Image<Rgb24>? Open(int index, int maxLongSide)
    {
        try
        {
            var header = _loader.Probe(paths[index]);
            // The decode holds the colour pixels at full size before the downscale.
            using var reservation = budget.Reserve(header.StoredSize.PixelCount * 4, CancellationToken.None);
            return _loader.LoadColour(paths[index], maxLongSide);
        }
        catch (ImageLoadException)
        {
            return null;
        }
    }
}
