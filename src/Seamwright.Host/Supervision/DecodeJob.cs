using System.Globalization;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Memory;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Host.Supervision;

/// <summary>
/// The worker's job: check the file against the budgets, identify it from its header, decode it
/// to gray with an allocation-limited ImageSharp configuration, and return a compact summary
/// (size, format, mean gray level). This is the seam where the Pipeline's ImageLoader and the
/// feature extraction plug in once they land: the defences below are the ones
/// RELIABILITY.md lists for ImageSharp 2.1.13, applied inside the disposable process.
/// </summary>
internal sealed class DecodeJob : IWorkerJob
{
    private readonly Configuration _configuration;

    public DecodeJob(long allocationLimitBytes)
    {
        _configuration = Configuration.Default.Clone();
        _configuration.MemoryAllocator = MemoryAllocator.Create(new MemoryAllocatorOptions
        {
            AllocationLimitMegabytes = (int)Math.Clamp(allocationLimitBytes >> 20, 1, int.MaxValue),
        });
    }

    public WorkerReply Run(WorkerRequest request)
    {
        var file = new FileInfo(request.Path);
        if (!file.Exists)
        {
            return Fail(request, "file not found");
        }
        if (file.Length > request.MaxFileBytes)
        {
            return Fail(request, string.Create(CultureInfo.InvariantCulture, $"file is {file.Length} bytes, over the {request.MaxFileBytes}-byte limit"));
        }
        string? sniffed = ImageSignature.Sniff(request.Path);
        if (sniffed is null)
        {
            return Fail(request, "content is not a supported image format (unknown signature)");
        }
        var info = Image.Identify(_configuration, request.Path, out var format);
        if (info is null)
        {
            return Fail(request, $"header not readable as {sniffed}");
        }
        long pixels = (long)info.Width * info.Height;
        if (info.Width <= 0 || info.Height <= 0 || pixels > request.MaxPixels)
        {
            return Fail(request, string.Create(CultureInfo.InvariantCulture, $"{info.Width} x {info.Height} pixels exceeds the {request.MaxPixels}-pixel budget"));
        }
        using var image = Image.Load<L8>(_configuration, request.Path);
        long sum = 0;
        image.ProcessPixelRows(rows =>
        {
            for (int y = 0; y < rows.Height; y++)
            {
                foreach (var p in rows.GetRowSpan(y))
                {
                    sum += p.PackedValue;
                }
            }
        });
        double mean = (double)sum / ((long)image.Width * image.Height);
        return new WorkerReply(request.Id, true, null, image.Width, image.Height, format?.Name ?? sniffed,
            string.Create(CultureInfo.InvariantCulture, $"mean gray {mean:F2}"), 0, false);
    }

    private static WorkerReply Fail(WorkerRequest request, string reason) =>
        new(request.Id, false, reason, 0, 0, null, null, 0, false);
}
