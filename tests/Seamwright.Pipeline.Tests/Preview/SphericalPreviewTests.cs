using Seamwright.Core.Cameras;
using Seamwright.Pipeline.Preview;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Pipeline.Tests.Preview;

public class SphericalPreviewTests
{
    private static readonly Rgb24[] Colours = [new(200, 40, 40), new(40, 200, 40), new(40, 40, 200), new(200, 200, 40)];

    [Fact]
    public void RenderJpeg_FourCamerasRoundTheTurn_EachColourAtItsLongitude()
    {
        // Four cameras 90 degrees apart with a 100 degree field of view: a full turn.
        double focal = 320 / Math.Tan(50 * Math.PI / 180);
        var poses = Enumerable.Range(0, 4)
            .Select(k => new CameraPose(k, Matrix3.FromYawPitchRoll(k * Math.PI / 2, 0, 0), focal, 319.5, 239.5, LensDistortion.None)).ToArray();
        var extent = AngularExtent.Of(poses, [.. Enumerable.Repeat((640, 480), 4)]);
        Assert.Equal(StitchProjection.Equirectangular, extent.Projection);
        Assert.Equal(360, extent.HorizontalDeg);
        byte[] jpeg = SphericalPreview.RenderJpeg(poses, extent, (i, _) => Solid(Colours[i]), new PreviewOptions { MaxLongSide = 720 });
        using var image = Image.Load<Rgb24>(jpeg);
        for (int k = 0; k < 4; k++)
        {
            // Longitude of camera k on the canvas (x = 0 at centre - 180 degrees).
            double lon = k * 90 - (extent.CentreLongitudeDeg - 180);
            int x = (int)(((lon % 360) + 360) % 360 / 360 * image.Width);
            var p = image[Math.Clamp(x, 0, image.Width - 1), image.Height / 2];
            Assert.True(Math.Abs(p.R - Colours[k].R) < 16 && Math.Abs(p.G - Colours[k].G) < 16 && Math.Abs(p.B - Colours[k].B) < 16,
                $"camera {k} at x {x}: {p}");
        }
    }

    private static Image<Rgb24> Solid(Rgb24 colour)
    {
        var image = new Image<Rgb24>(64, 48);
        image.ProcessPixelRows(rows =>
        {
            for (int y = 0; y < rows.Height; y++)
            {
                rows.GetRowSpan(y).Fill(colour);
            }
        });
        return image;
    }
}
