using Seamwright.Core.Cameras;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Preview;

/// <summary>
/// The preview of a rotation set in its suggested wide projection: canvas x is longitude across
/// the covered arc, canvas y latitude (equirectangular) or its tangent (cylindrical), in the
/// levelled world. Each canvas pixel's ray is carried into every camera (rotation, focal length,
/// distortion) and sampled bilinearly, blended with weights falling off towards each image's
/// border, as the plane preview does. Images are opened one at a time.
/// </summary>
public static class SphericalPreview
{
    private static readonly Rgb24 Background = new(36, 38, 43);

    public static byte[] RenderJpeg(IReadOnlyList<CameraPose> poses, AngularExtent extent, PreviewImageOpener open, PreviewOptions options)
    {
        ArgumentNullException.ThrowIfNull(poses);
        ArgumentNullException.ThrowIfNull(extent);
        ArgumentNullException.ThrowIfNull(open);
        ArgumentNullException.ThrowIfNull(options);
        double scale = Math.Min(1.0, options.MaxLongSide / (double)Math.Max(extent.CanvasWidth, extent.CanvasHeight));
        int width = Math.Max(1, (int)Math.Round(extent.CanvasWidth * scale)), height = Math.Max(1, (int)Math.Round(extent.CanvasHeight * scale));
        double lon0 = (extent.CentreLongitudeDeg - extent.HorizontalDeg / 2) * Math.PI / 180, lonSpan = extent.HorizontalDeg * Math.PI / 180;
        double top = extent.TopDeg * Math.PI / 180, bottom = extent.BottomDeg * Math.PI / 180;
        bool cylindrical = extent.Projection == StitchProjection.Cylindrical;
        var rays = new (double X, double Y, double Z)[width * height];
        for (int y = 0; y < height; y++)
        {
            double t = (y + 0.5) / height;
            double lat = cylindrical ? Math.Atan(Math.Tan(top) + t * (Math.Tan(bottom) - Math.Tan(top))) : top + t * (bottom - top);
            for (int x = 0; x < width; x++)
            {
                double lon = lon0 + (x + 0.5) / width * lonSpan;
                rays[y * width + x] = (Math.Cos(lat) * Math.Sin(lon), -Math.Sin(lat), Math.Cos(lat) * Math.Cos(lon));
            }
        }
        var sum = new float[width * height * 3];
        var weight = new float[width * height];
        foreach (var pose in poses.OrderBy(p => p.Index))
        {
            Accumulate(pose, rays, open, scale, sum, weight);
        }
        using var image = new Image<Rgb24>(width, height);
        image.ProcessPixelRows(rows =>
        {
            for (int y = 0; y < height; y++)
            {
                var row = rows.GetRowSpan(y);
                for (int x = 0; x < width; x++)
                {
                    int i = y * width + x;
                    float w = weight[i];
                    row[x] = w > 0 ? new Rgb24(ToByte(sum[3 * i] / w), ToByte(sum[3 * i + 1] / w), ToByte(sum[3 * i + 2] / w)) : Background;
                }
            }
        });
        return PreviewRenderer.EncodeJpeg(image, options.JpegQuality);
    }

    private static void Accumulate(CameraPose pose, (double X, double Y, double Z)[] rays, PreviewImageOpener open, double scale, float[] sum, float[] weight)
    {
        double fw = 2 * pose.Cx + 1, fh = 2 * pose.Cy + 1;
        int side = (int)Math.Clamp(Math.Ceiling(Math.Max(fw, fh) * scale * 1.5), 16, Math.Max(fw, fh));
        using var source = open(pose.Index, side);
        if (source is null)
        {
            return;
        }
        int sw = source.Width, sh = source.Height;
        double sx = sw / fw, sy = sh / fh;
        var pixels = new Rgb24[sw * sh];
        source.CopyPixelDataTo(pixels);
        var toCamera = pose.Rotation.Transpose();
        double feather = 0.5 * Math.Min(fw, fh);
        for (int i = 0; i < rays.Length; i++)
        {
            var (cx, cy, cz) = toCamera.Apply(rays[i].X, rays[i].Y, rays[i].Z);
            if (cz <= 1e-6)
            {
                continue;
            }
            var (dx, dy) = pose.Distortion.Distort(cx / cz, cy / cz);
            double fx = pose.FocalPx * dx + pose.Cx, fy = pose.FocalPx * dy + pose.Cy;
            double edge = Math.Min(Math.Min(fx + 0.5, fw - 0.5 - fx), Math.Min(fy + 0.5, fh - 0.5 - fy));
            if (!(edge > 0))
            {
                continue;
            }
            float blend = (float)Math.Min(1.0, edge / feather);
            blend *= blend;
            double px = Math.Clamp((fx + 0.5) * sx - 0.5, 0, sw - 1), py = Math.Clamp((fy + 0.5) * sy - 0.5, 0, sh - 1);
            int ix = Math.Min((int)px, Math.Max(sw - 2, 0)), iy = Math.Min((int)py, Math.Max(sh - 2, 0));
            int jx = Math.Min(ix + 1, sw - 1), jy = Math.Min(iy + 1, sh - 1);
            float ax = (float)(px - ix), ay = (float)(py - iy);
            var p00 = pixels[iy * sw + ix];
            var p10 = pixels[iy * sw + jx];
            var p01 = pixels[jy * sw + ix];
            var p11 = pixels[jy * sw + jx];
            sum[3 * i] += blend * Bilinear(p00.R, p10.R, p01.R, p11.R, ax, ay);
            sum[3 * i + 1] += blend * Bilinear(p00.G, p10.G, p01.G, p11.G, ax, ay);
            sum[3 * i + 2] += blend * Bilinear(p00.B, p10.B, p01.B, p11.B, ax, ay);
            weight[i] += blend;
        }
    }

    private static byte ToByte(float v) => (byte)Math.Clamp((int)MathF.Round(v), 0, 255);

    private static float Bilinear(byte a, byte b, byte c, byte d, float ax, float ay) =>
        (a * (1 - ax) + b * ax) * (1 - ay) + (c * (1 - ax) + d * ax) * ay;
}
