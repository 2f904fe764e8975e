using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Memory;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Pipeline.Alignment;

/// <summary>
/// Opens image files in colour for the preview and thumbnails: upright as displayed (EXIF
/// orientation applied, so coordinates match the analysis), scaled down to a long side. The files
/// have already passed the loader's checks in the same run; the decode still runs with a capped
/// allocator, and any failure gives null (a missing tile in a preview is not worth a failed set).
/// </summary>
public sealed class PreviewFiles(IReadOnlyList<string> paths, int allocationLimitMegabytes = 1024)
{
    private readonly Configuration _configuration = CreateConfiguration(allocationLimitMegabytes);

    public Image<Rgb24>? Open(int index, int maxLongSide)
    {
        try
        {
            var image = Image.Load<Rgb24>(_configuration, paths[index]);
            try
            {
                image.Mutate(x => x.AutoOrient());
                double s = Math.Min(1.0, (double)maxLongSide / Math.Max(image.Width, image.Height));
                if (s < 1)
                {
                    int w = Math.Max(1, (int)Math.Round(image.Width * s)), h = Math.Max(1, (int)Math.Round(image.Height * s));
                    image.Mutate(x => x.Resize(w, h));
                }
                return image;
            }
            catch
            {
                image.Dispose();
                throw;
            }
        }
        catch (Exception e) when (e is not OperationCanceledException)
        {
            // Whatever the decoder throws, the preview goes on without this image.
            return null;
        }
    }

    private static Configuration CreateConfiguration(int limitMegabytes)
    {
        var configuration = Configuration.Default.Clone();
        configuration.MemoryAllocator = MemoryAllocator.Create(new MemoryAllocatorOptions { AllocationLimitMegabytes = limitMegabytes });
        return configuration;
    }
}
