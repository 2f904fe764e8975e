using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Core.Synthetic;
using Seamwright.Core.Tests.Imaging;

namespace Seamwright.Core.Tests.Synthetic;

public class SceneRendererTests
{
    [Fact]
    public void Render_SameSeed_IsBitIdentical()
    {
        var a = SceneRenderer.Render(new ProceduralScene(5), 160, 120, Transform2D.Translation(1000, -300));
        var b = SceneRenderer.Render(new ProceduralScene(5), 160, 120, Transform2D.Translation(1000, -300));
        var c = SceneRenderer.Render(new ProceduralScene(6), 160, 120, Transform2D.Translation(1000, -300));
        Assert.Equal(a.Pixels, b.Pixels);
        Assert.NotEqual(a.Pixels, c.Pixels);
    }

    [Theory]
    [InlineData(SceneStyle.EstateMap)]
    [InlineData(SceneStyle.Courtyard)]
    public void Render_AnyRegion_IsTexturedEverywhereAndDoesNotRepeat(SceneStyle style)
    {
        var scene = new ProceduralScene(11, style);
        var image = SceneRenderer.Render(scene, 320, 240, Transform2D.Translation(-5000, 7000), samplesPerAxis: 1);
        // Every 40 x 40 block has visible structure.
        for (int by = 0; by < 6; by++)
        {
            for (int bx = 0; bx < 8; bx++)
            {
                Assert.True(BlockStdDev(image, bx * 40, by * 40, 40) > 4, $"flat block at {bx},{by}");
            }
        }
        // A far-away region differs from this one (no small period).
        var far = SceneRenderer.Render(scene, 320, 240, Transform2D.Translation(-5000 + 4096, 7000), samplesPerAxis: 1);
        Assert.True(TestImages.MeanAbsDiff(image, far, 0) > 10);
    }

    [Fact]
    public void Between_WarpedFirstView_MatchesRenderedSecondView()
    {
        // The truth transform between two views must agree with what was rendered.
        var scene = new ProceduralScene(21);
        var a = new SceneView(300, 220, Transform2D.Translation(200, 100));
        var homography = ViewTransforms.SimilarityAbout(150, 110, 1.3, 0.5, 12, -7) * new Transform2D(1, 0, 0, 0, 1, 0, 2e-4, -1e-4, 1);
        var b = new SceneView(300, 220, a.ImageToScene * homography);
        var imageA = SceneRenderer.Render(scene, a);
        var imageB = SceneRenderer.Render(scene, b);
        var aToB = SceneView.Between(a, b);
        var mask = new GrayImage(300, 220);
        var predicted = ImageWarper.Warp(imageA, aToB, 300, 220, 0, mask);
        double sum = 0;
        int n = 0;
        for (int y = 0; y < 220; y++)
        {
            for (int x = 0; x < 300; x++)
            {
                if (mask[x, y] == 255)
                {
                    sum += Math.Abs(predicted[x, y] - imageB[x, y]);
                    n++;
                }
            }
        }
        Assert.True(n > 10_000);
        double mean = sum / n;
        Assert.True(mean < 6, $"mean abs diff {mean}");
        // A transform off by 2 px must fit clearly worse, so the check above has teeth.
        var shifted = ImageWarper.Warp(imageA, Transform2D.Translation(2, 0) * aToB, 300, 220, 0);
        double shiftedSum = 0;
        for (int y = 0; y < 220; y++)
        {
            for (int x = 0; x < 300; x++)
            {
                if (mask[x, y] == 255)
                {
                    shiftedSum += Math.Abs(shifted[x, y] - imageB[x, y]);
                }
            }
        }
        Assert.True(shiftedSum / n > 1.5 * mean, $"shifted {shiftedSum / n} vs {mean}");
    }

    [Fact]
    public void CameraRotation_Yaw_MovesPrincipalPointByFocalTimesTangent()
    {
        double f = 700, cx = 400, cy = 300, yaw = 0.2;
        var h = ViewTransforms.CameraRotation(f, cx, cy, yaw, 0, 0);
        var (x, y) = h.Apply(cx, cy);
        Assert.Equal(cx + f * Math.Tan(yaw), x, 9);
        Assert.Equal(cy, y, 9);
        var back = ViewTransforms.CameraRotation(f, cx, cy, -yaw, 0, 0) * h;
        Assert.True(Transform2D.MaxPointDistance(back, Transform2D.Identity, Transform2D.Corners(800, 600)) < 1e-9);
    }

    [Fact]
    public void SimilarityAbout_Centre_StaysFixed()
    {
        var t = ViewTransforms.SimilarityAbout(50, 40, 1.7, 1.1);
        var (x, y) = t.Apply(50, 40);
        Assert.Equal(50, x, 9);
        Assert.Equal(40, y, 9);
        Assert.Equal(1.7 * 1.7, t.Determinant, 9);
    }

    private static double BlockStdDev(GrayImage image, int x0, int y0, int size)
    {
        double sum = 0, sumSq = 0;
        for (int y = y0; y < y0 + size; y++)
        {
            for (int x = x0; x < x0 + size; x++)
            {
                sum += image[x, y];
                sumSq += image[x, y] * (double)image[x, y];
            }
        }
        int n = size * size;
        return Math.Sqrt(Math.Max(0, sumSq / n - sum * sum / n / n));
    }
}
