using Seamwright.Core.Features.ScaleSpace;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Features;

/// <summary>Affine view synthesis (Morel and Yu, SIAM J. Imaging Sciences 2009): the view plan and the mapping back to the image.</summary>
public class AffineViewsTests
{
    [Fact]
    public void Plan_ThreeTilts_LongitudeStepsOfSeventyTwoOverT()
    {
        var views = AffineViews.Plan(3);
        // The paper's sampling: t = sqrt(2): 0, 50.9, 101.8, 152.7 degrees; t = 2: every 36; t = 2 sqrt(2): every 25.5 up to 178.2.
        Assert.Equal([4, 5, 8], views.GroupBy(v => Math.Round(v.Tilt, 6)).Select(g => g.Count()));
        Assert.All(views, v => Assert.InRange(v.Angle, 0, Math.PI));
        Assert.Equal(36 * Math.PI / 180, views.Where(v => Math.Abs(v.Tilt - 2) < 1e-9).ElementAt(1).Angle, 12);
    }

    [Theory]
    [InlineData(1.4142135623730951, 0.0)]
    [InlineData(2.0, 0.6283185307179586)]
    [InlineData(2.8284271247461903, 2.2)]
    public void Render_BrightDot_MapsBackToItsSourcePosition(double tilt, double angle)
    {
        var image = new GrayImage(200, 150);
        Array.Fill(image.Pixels, (byte)40);
        for (int y = 58; y <= 62; y++)
        {
            for (int x = 128; x <= 132; x++)
            {
                image[x, y] = 250;
            }
        }
        var view = AffineViews.Render(image, new AffineView(tilt, angle));
        // The brightest view pixel, refined by the intensity-weighted centre of its neighbourhood.
        int best = Array.IndexOf(view.Image.Pixels, view.Image.Pixels.Max());
        int bx = best % view.Image.Width, by = best / view.Image.Width;
        double sx = 0, sy = 0, sw = 0;
        for (int y = Math.Max(0, by - 4); y <= Math.Min(view.Image.Height - 1, by + 4); y++)
        {
            for (int x = Math.Max(0, bx - 4); x <= Math.Min(view.Image.Width - 1, bx + 4); x++)
            {
                double w = Math.Max(0, view.Image[x, y] - 40);
                sx += w * x;
                sy += w * y;
                sw += w;
            }
        }
        var (ux, uy) = view.ToSource(sx / sw, sy / sw);
        Assert.True(Math.Abs(ux - 130) < 1.0 && Math.Abs(uy - 60) < 1.0, $"mapped back to ({ux:F2}, {uy:F2}), expected (130, 60)");
        Assert.True(view.Image.Width < image.Width * 2 && view.Image.Height <= (int)Math.Ceiling(200 + 150.0), $"{view.Image.Width} x {view.Image.Height}");
    }

    [Fact]
    public void Detect_SameImageTwice_SamePoolInsideTheImage()
    {
        var image = SceneRenderer.Render(new ProceduralScene(5, SceneStyle.Courtyard), 240, 180, Transform2D.Identity);
        var first = AffineViewDetector.Detect(image, new ScaleSpaceOptions(), 3, 300);
        var second = AffineViewDetector.Detect(image, new ScaleSpaceOptions(), 3, 300);
        Assert.True(first.Count > 200, $"{first.Count} pooled features");
        Assert.Equal(first.Keypoints, second.Keypoints);
        Assert.Equal(first.Descriptors, second.Descriptors);
        Assert.All(first.Keypoints, k => Assert.True(k.X >= 0 && k.Y >= 0 && k.X <= 239 && k.Y <= 179, $"({k.X}, {k.Y})"));
    }
}
