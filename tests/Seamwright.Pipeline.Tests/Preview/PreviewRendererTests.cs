using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Preview;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Preview;

public sealed class PreviewRendererTests(ITestOutputHelper output)
{
    [Fact]
    public void Render_AlignedTiles_LooksLikeTheScene()
    {
        using var scene = new TileScene(3, 2, 400, 300, 300, 220);
        var alignment = SetAligner.Align([.. scene.Tiles.Select(_ => scene.TileSize)], scene.Links(3), MotionModel.Translation);
        Assert.Equal(6, alignment.PlacedCount);
        var placed = alignment.Images.Select(p => new PreviewImage(p.Index, scene.TileSize, p.ToReference!.Value)).ToList();
        var canvas = alignment.Canvas!.Value;
        using var preview = PreviewRenderer.Render(placed, canvas, (i, side) => Open(scene.Tiles[i], side), new PreviewOptions { MaxLongSide = 500 });
        Assert.True(Math.Max(preview.Width, preview.Height) <= 500);
        // The scene, shifted into the reference frame and scaled the same way.
        double scale = Math.Min(1.0, 500 / Math.Max(canvas.Width, canvas.Height));
        var (refX, refY) = scene.Offsets[alignment.Reference!.Value];
        using var expected = scene.Scene.Clone(c => c.Resize((int)Math.Round(scene.Scene.Width * scale), (int)Math.Round(scene.Scene.Height * scale)));
        double sum = 0;
        int n = 0;
        for (int y = 2; y < preview.Height - 2; y++)
        {
            for (int x = 2; x < preview.Width - 2; x++)
            {
                // Canvas pixel -> reference pixel -> scene pixel.
                double sx = (x / scale + canvas.MinX + refX) * scale, sy = (y / scale + canvas.MinY + refY) * scale;
                int ix = (int)Math.Round(sx), iy = (int)Math.Round(sy);
                if (ix < 0 || iy < 0 || ix >= expected.Width || iy >= expected.Height)
                {
                    continue;
                }
                var a = preview[x, y];
                var b = expected[ix, iy];
                sum += (Math.Abs(a.R - b.R) + Math.Abs(a.G - b.G) + Math.Abs(a.B - b.B)) / 3.0;
                n++;
            }
        }
        double mean = sum / n;
        output.WriteLine($"preview {preview.Width}x{preview.Height}, mean absolute difference to the scene {mean:0.00} levels over {n} pixels");
        Assert.True(n > preview.Width * preview.Height / 2);
        Assert.True(mean < 6, $"mean difference {mean}");
    }

    [Fact]
    public void RenderJpeg_SameInput_SameBytes()
    {
        using var scene = new TileScene(2, 1, 200, 150, 150, 0);
        var placed = new List<PreviewImage>
        {
            new(0, scene.TileSize, Transform2D.Identity),
            new(1, scene.TileSize, Transform2D.Translation(150, 0)),
        };
        var canvas = new CanvasBounds(0, 0, 349, 149);
        var a = PreviewRenderer.RenderJpeg(placed, canvas, (i, s) => Open(scene.Tiles[i], s));
        var b = PreviewRenderer.RenderJpeg(placed, canvas, (i, s) => Open(scene.Tiles[i], s));
        Assert.Equal(a, b);
        Assert.True(a.Length > 1000);
    }

    private static Image<Rgb24> Open(Image<Rgb24> tile, int maxLongSide)
    {
        double s = Math.Min(1.0, (double)maxLongSide / Math.Max(tile.Width, tile.Height));
        return tile.Clone(c => c.Resize(Math.Max(1, (int)Math.Round(tile.Width * s)), Math.Max(1, (int)Math.Round(tile.Height * s))));
    }
}
