using System.Globalization;
using Seamwright.Core.Geometry;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Metadata.Profiles.Exif;

namespace Seamwright.Pipeline.Alignment;

/// <summary>What an image's EXIF says about its camera: make and model, and the focal length in pixels when it can be worked out.</summary>
/// <param name="Camera">Make and model ("" when absent).</param>
/// <param name="FocalPx">Focal length in pixels of the image as it is (null when the metadata does not give one).</param>
public sealed record ExifCamera(string Camera, double? FocalPx)
{
    public static readonly ExifCamera None = new("", null);

    /// <summary>
    /// Focal length in pixels (Exif 2.32, CIPA DC-008): FocalLength (mm) times FocalPlaneXResolution
    /// (pixels per FocalPlaneResolutionUnit: 2 inch, 3 cm; 4 mm and 5 micrometre as some writers use),
    /// rescaled when PixelXDimension / PixelYDimension say the image was resized since; otherwise
    /// FocalLengthIn35mmFilm over the 35 mm frame's diagonal (43.27 mm) times the image's diagonal.
    /// Null when neither is given or the result is outside 0.1 to 20 diagonals (not a focal length).
    /// </summary>
    public static double? FocalFrom(double? focalMm, double? planeResolution, int? planeUnit, int? pixelX, int? pixelY, double? focal35mm, ImageSize size)
    {
        double diagonal = Math.Sqrt((double)size.Width * size.Width + (double)size.Height * size.Height);
        double? focal = null;
        double? unitMm = planeUnit switch { 2 => 25.4, 3 => 10, 4 => 1, 5 => 0.001, _ => null };
        if (focalMm is > 0 && planeResolution is > 0 && unitMm is double mm)
        {
            focal = focalMm.Value * planeResolution.Value / mm;
            if (pixelX is > 0 && pixelY is > 0)
            {
                // The focal plane resolution is the sensor's: scale to the image as it is now (either orientation).
                focal *= Math.Max(size.Width, size.Height) / (double)Math.Max(pixelX.Value, pixelY.Value);
            }
        }
        else if (focal35mm is > 0)
        {
            focal = focal35mm.Value / Math.Sqrt(36 * 36 + 24 * 24) * diagonal;
        }
        return focal is double f && f >= 0.1 * diagonal && f <= 20 * diagonal ? f : null;
    }

    /// <summary>Reads the file's EXIF (header only); <see cref="None"/> when it has none or cannot be read.</summary>
    public static ExifCamera Read(string path, ImageSize size)
    {
        try
        {
            var exif = Image.Identify(path)?.Metadata.ExifProfile;
            if (exif is null)
            {
                return None;
            }
            string make = exif.GetValue(ExifTag.Make)?.Value?.Trim('\0', ' ') ?? "";
            string model = exif.GetValue(ExifTag.Model)?.Value?.Trim('\0', ' ') ?? "";
            double? focalMm = Value(exif.GetValue(ExifTag.FocalLength)?.Value);
            double? resolution = Value(exif.GetValue(ExifTag.FocalPlaneXResolution)?.Value);
            int? unit = exif.GetValue(ExifTag.FocalPlaneResolutionUnit)?.Value;
            int? pixelX = Dimension(exif.GetValue(ExifTag.PixelXDimension)?.Value);
            int? pixelY = Dimension(exif.GetValue(ExifTag.PixelYDimension)?.Value);
            double? focal35 = exif.GetValue(ExifTag.FocalLengthIn35mmFilm)?.Value;
            string camera = (make + " " + model).Trim();
            return new ExifCamera(camera, FocalFrom(focalMm, resolution, unit, pixelX, pixelY, focal35, size));
        }
        catch (Exception e) when (e is IOException or UnknownImageFormatException or InvalidImageContentException or NotSupportedException)
        {
            return None; // the loader already accepted the file; a metadata problem only loses the camera facts
        }
    }

    private static double? Value(Rational? r) => r is { Denominator: > 0 } v ? (double)v.Numerator / v.Denominator : null;

    private static int? Dimension(Number? n) => n is { } v ? (int)(uint)v : null;

    /// <summary>For logs and reasons.</summary>
    public override string ToString() => string.Create(CultureInfo.InvariantCulture, $"{(Camera.Length > 0 ? Camera : "unknown camera")}, focal {(FocalPx is double f ? f.ToString("0.#", CultureInfo.InvariantCulture) + " px" : "not given")}");
}
