using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Pipeline.Tests.Preview;

/// <summary>
/// A smooth coloured scene cut into overlapping tiles with known offsets: a preview of the tiles
/// must look like the scene itself.
/// </summary>
internal sealed class TileScene : IDisposable
{
    public TileScene(int columns, int rows, int tileWidth, int tileHeight, int stepX, int stepY)
    {
        Scene = new Image<Rgb24>(stepX * (columns - 1) + tileWidth, stepY * (rows - 1) + tileHeight);
        Scene.ProcessPixelRows(acc =>
        {
            for (int y = 0; y < acc.Height; y++)
            {
                var row = acc.GetRowSpan(y);
                for (int x = 0; x < row.Length; x++)
                {
                    double r = 128 + 100 * Math.Sin(x / 37.0) * Math.Cos(y / 53.0);
                    double g = 128 + 90 * Math.Sin((x + 2 * y) / 71.0);
                    double b = 128 + 80 * Math.Cos((3 * x - y) / 97.0);
                    row[x] = new Rgb24((byte)r, (byte)g, (byte)b);
                }
            }
        });
        for (int r = 0; r < rows; r++)
        {
            for (int c = 0; c < columns; c++)
            {
                int x = c * stepX, y = r * stepY;
                Tiles.Add(Scene.Clone(ctx => ctx.Crop(new Rectangle(x, y, tileWidth, tileHeight))));
                Offsets.Add((x, y));
                Names.Add($"tile_r{r}_c{c}.png");
            }
        }
        TileSize = new ImageSize(tileWidth, tileHeight);
    }

    public Image<Rgb24> Scene { get; }

    public List<Image<Rgb24>> Tiles { get; } = [];

    public List<(int X, int Y)> Offsets { get; } = [];

    public List<string> Names { get; } = [];

    public ImageSize TileSize { get; }

    /// <summary>Links between horizontal and vertical neighbours with exact tie points.</summary>
    public List<AlignmentLink> Links(int columns)
    {
        var links = new List<AlignmentLink>();
        for (int i = 0; i < Tiles.Count; i++)
        {
            foreach (int j in new[] { i + 1, i + columns })
            {
                if (j >= Tiles.Count || (j == i + 1 && (i + 1) % columns == 0))
                {
                    continue;
                }
                double dx = Offsets[i].X - Offsets[j].X, dy = Offsets[i].Y - Offsets[j].Y;
                var ties = new List<Correspondence>();
                for (int y = 10; y < TileSize.Height; y += 40)
                {
                    for (int x = 10; x < TileSize.Width; x += 40)
                    {
                        double u = x + dx, v = y + dy;
                        if (u >= 0 && v >= 0 && u < TileSize.Width && v < TileSize.Height)
                        {
                            ties.Add(new Correspondence(x, y, u, v));
                        }
                    }
                }
                links.Add(new AlignmentLink(i, j, Transform2D.Translation(dx, dy), [.. ties], PairStatus.Accepted, ties.Count));
            }
        }
        return links;
    }

    public void Dispose()
    {
        Scene.Dispose();
        foreach (var t in Tiles)
        {
            t.Dispose();
        }
    }
}
