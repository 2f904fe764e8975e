using Seamwright.Core.Alignment;
using Seamwright.Core.Geometry;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Formats.Jpeg;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Preview;

/// <summary>One placed image of the preview: its full-resolution size and its transform into the reference.</summary>
public sealed record PreviewImage(int Index, ImageSize FullSize, Transform2D ToReference);

/// <summary>
/// Opens an image for the preview at no more than about the asked long side (a smaller decode is
/// fine: the renderer scales coordinates by the returned size). Null when it cannot be read.
/// The caller disposes the returned image.
/// </summary>
public delegate Image<Rgb24>? PreviewImageOpener(int index, int maxLongSide);

/// <summary>
/// A low-resolution mosaic of a set: a bounded canvas over the placed images, each canvas pixel
/// pulled from the images by inverse warping with bilinear sampling, blended with weights that fall
/// off towards each image's border (feathering). Images are opened one at a time, downscaled close
/// to their footprint on the canvas, so memory stays bounded whatever the set.
/// </summary>
public static class PreviewRenderer
{
    private static readonly Rgb24 Background = new(36, 38, 43);

    public static Image<Rgb24> Render(IReadOnlyList<PreviewImage> images, CanvasBounds canvas, PreviewImageOpener open, PreviewOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(images);
        ArgumentNullException.ThrowIfNull(open);
        options ??= new PreviewOptions();
        options.Validate();
        double longest = Math.Max(Math.Max(canvas.Width, canvas.Height), 1);
        double scale = Math.Min(1.0, options.MaxLongSide / longest);
        int width = Math.Clamp((int)Math.Ceiling(canvas.Width * scale) + 1, 1, options.MaxLongSide);
        int height = Math.Clamp((int)Math.Ceiling(canvas.Height * scale) + 1, 1, options.MaxLongSide);
        var sum = new float[width * height * 3];
        var weight = new float[width * height];
        // Images are opened (decoded, resized) a batch at a time in parallel and blended strictly in
        // index order, so the float sums are those of one image after another.
        var ordered = images.OrderBy(i => i.Index).ToArray();
        var areas = ordered.Select(i => AreaOf(i, canvas, scale, width, height)).ToArray();
        int batch = 2 * Environment.ProcessorCount;
        var opened = new Image<Rgb24>?[batch];
        for (int start = 0; start < ordered.Length; start += batch)
        {
            int count = Math.Min(batch, ordered.Length - start);
            OpenBatch(ordered, areas, start, count, open, opened);
            for (int k = 0; k < count; k++)
            {
                using var source = opened[k];
                opened[k] = null;
                if (source is not null && areas[start + k] is { } area)
                {
                    Blend(ordered[start + k], area, source, canvas, scale, width, sum, weight);
                }
            }
        }
        var result = new Image<Rgb24>(width, height);
        result.ProcessPixelRows(rows =>
        {
            for (int y = 0; y < height; y++)
            {
                var row = rows.GetRowSpan(y);
                for (int x = 0; x < width; x++)
                {
                    int i = y * width + x;
                    float w = weight[i];
                    row[x] = w > 0
                        ? new Rgb24(ToByte(sum[3 * i] / w), ToByte(sum[3 * i + 1] / w), ToByte(sum[3 * i + 2] / w))
                        : Background;
                }
            }
        });
        return result;
    }

    /// <summary>The preview as JPEG bytes.</summary>
    public static byte[] RenderJpeg(IReadOnlyList<PreviewImage> images, CanvasBounds canvas, PreviewImageOpener open, PreviewOptions? options = null)
    {
        options ??= new PreviewOptions();
        using var image = Render(images, canvas, open, options);
        return EncodeJpeg(image, options.JpegQuality);
    }

    public static byte[] EncodeJpeg(Image<Rgb24> image, int quality)
    {
        ArgumentNullException.ThrowIfNull(image);
        using var stream = new MemoryStream();
        image.SaveAsJpeg(stream, new JpegEncoder { Quality = quality });
        return stream.ToArray();
    }

    private static byte ToByte(float v) => (byte)Math.Clamp((int)MathF.Round(v), 0, 255);

    /// <summary>Where an image lands on the preview (pixel box), its inverse transform and the long side to open it at; null when it lands nowhere.</summary>
    private readonly record struct PreviewArea(int X0, int X1, int Y0, int Y1, Transform2D FromReference, int OpenSide);

    private static PreviewArea? AreaOf(PreviewImage image, CanvasBounds canvas, double scale, int width, int height)
    {
        if (!image.ToReference.TryInvert(out var fromReference))
        {
            return null;
        }
        var corners = Transform2D.Corners(image.FullSize.Width, image.FullSize.Height);
        double minX = double.PositiveInfinity, minY = double.PositiveInfinity, maxX = double.NegativeInfinity, maxY = double.NegativeInfinity;
        foreach (var (x, y) in corners)
        {
            var (u, v) = image.ToReference.Apply(x, y);
            minX = Math.Min(minX, (u - canvas.MinX) * scale); maxX = Math.Max(maxX, (u - canvas.MinX) * scale);
            minY = Math.Min(minY, (v - canvas.MinY) * scale); maxY = Math.Max(maxY, (v - canvas.MinY) * scale);
        }
        if (!double.IsFinite(minX + minY + maxX + maxY))
        {
            return null;
        }
        int x0 = Math.Max(0, (int)Math.Floor(minX)), x1 = Math.Min(width - 1, (int)Math.Ceiling(maxX));
        int y0 = Math.Max(0, (int)Math.Floor(minY)), y1 = Math.Min(height - 1, (int)Math.Ceiling(maxY));
        if (x0 > x1 || y0 > y1)
        {
            return null;
        }
        int fullLong = Math.Max(image.FullSize.Width, image.FullSize.Height);
        int footprint = (int)Math.Ceiling(Math.Max(maxX - minX, maxY - minY) * 1.5);
        return new PreviewArea(x0, x1, y0, y1, fromReference, Math.Clamp(footprint, 16, fullLong));
    }

    /// <summary>Opens images start .. start + count - 1 of those that land somewhere, in parallel; a failure of one is rethrown as itself.</summary>
    private static void OpenBatch(PreviewImage[] ordered, PreviewArea?[] areas, int start, int count, PreviewImageOpener open, Image<Rgb24>?[] opened)
    {
        try
        {
            Parallel.For(0, count, k =>
            {
                if (areas[start + k] is { } area)
                {
                    opened[k] = open(ordered[start + k].Index, area.OpenSide);
                }
            });
        }
        catch (AggregateException e)
        {
            for (int k = 0; k < count; k++)
            {
                opened[k]?.Dispose();
                opened[k] = null;
            }
            System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(e.InnerExceptions[0]).Throw();
        }
    }

    private static void Blend(PreviewImage image, PreviewArea area, Image<Rgb24> source, CanvasBounds canvas, double scale, int width,
        float[] sum, float[] weight)
    {
        var (x0, x1, y0, y1, fromReference, _) = area;
        double sx = (double)source.Width / image.FullSize.Width, sy = (double)source.Height / image.FullSize.Height;
        int sw = source.Width, sh = source.Height;
        var pixels = new Rgb24[sw * sh];
        source.CopyPixelDataTo(pixels);
        double fw = image.FullSize.Width, fh = image.FullSize.Height;
        double feather = 0.5 * Math.Min(fw, fh);
        for (int y = y0; y <= y1; y++)
        {
            double ry = y / scale + canvas.MinY;
            for (int x = x0; x <= x1; x++)
            {
                double rx = x / scale + canvas.MinX;
                double w = fromReference.W(rx, ry);
                if (!(w > 0) || !fromReference.TryApply(rx, ry, out double fx, out double fy))
                {
                    continue;
                }
                double edge = Math.Min(Math.Min(fx + 0.5, fw - 0.5 - fx), Math.Min(fy + 0.5, fh - 0.5 - fy));
                if (edge <= 0)
                {
                    continue;
                }
                float blend = (float)Math.Min(1.0, edge / feather);
                blend *= blend;
                // Pixel centres at integers in both the full image and the decoded copy.
                double px = Math.Clamp((fx + 0.5) * sx - 0.5, 0, sw - 1), py = Math.Clamp((fy + 0.5) * sy - 0.5, 0, sh - 1);
                int ix = Math.Min((int)px, sw - 2 < 0 ? 0 : sw - 2), iy = Math.Min((int)py, sh - 2 < 0 ? 0 : sh - 2);
                int jx = Math.Min(ix + 1, sw - 1), jy = Math.Min(iy + 1, sh - 1);
                float ax = (float)(px - ix), ay = (float)(py - iy);
                var p00 = pixels[iy * sw + ix];
                var p10 = pixels[iy * sw + jx];
                var p01 = pixels[jy * sw + ix];
                var p11 = pixels[jy * sw + jx];
                float r = Bilinear(p00.R, p10.R, p01.R, p11.R, ax, ay);
                float g = Bilinear(p00.G, p10.G, p01.G, p11.G, ax, ay);
                float b = Bilinear(p00.B, p10.B, p01.B, p11.B, ax, ay);
                int i = y * width + x;
                sum[3 * i] += blend * r;
                sum[3 * i + 1] += blend * g;
                sum[3 * i + 2] += blend * b;
                weight[i] += blend;
            }
        }
    }

    private static float Bilinear(byte a, byte b, byte c, byte d, float ax, float ay) =>
        (a * (1 - ax) + b * ax) * (1 - ay) + (c * (1 - ax) + d * ax) * ay;
}
