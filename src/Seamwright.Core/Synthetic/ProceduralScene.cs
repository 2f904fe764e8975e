using System.Collections.Concurrent;

namespace Seamwright.Core.Synthetic;

/// <summary>The look of a procedural scene.</summary>
public enum SceneStyle
{
    /// <summary>A hand-drawn estate map: paper, contour lines, fields, buildings, trees, roads.</summary>
    EstateMap,

    /// <summary>A paved courtyard with walls, windows, arches and plants.</summary>
    Courtyard,
}

/// <summary>
/// An infinite, non-repeating gray scene defined at every real point (scene units), seeded and
/// deterministic: the same seed and style give the same value at the same point on every run.
/// Layers: a fractal-noise ground, style-specific line work, and shapes scattered per cell of a
/// square grid (each cell's shapes come from a hash of the cell, so any region can be evaluated
/// without the rest). Details are at least about one scene unit wide; render at one scene unit
/// per pixel or coarser for clean anti-aliasing.
/// </summary>
public sealed class ProceduralScene
{
    private readonly ConcurrentDictionary<(long X, long Y), SceneShape[]> _cells = new();

    /// <param name="seed">Seed of everything random in the scene.</param>
    /// <param name="style">The look.</param>
    /// <param name="detailScale">Multiplies every size (1 = details of a few to a few tens of units).</param>
    public ProceduralScene(ulong seed, SceneStyle style = SceneStyle.EstateMap, double detailScale = 1.0)
    {
        if (!double.IsFinite(detailScale) || detailScale <= 0)
        {
            throw new ArgumentOutOfRangeException(nameof(detailScale), detailScale, "detailScale must be positive.");
        }
        Seed = seed;
        Style = style;
        DetailScale = detailScale;
        CellSize = 40 * detailScale;
    }

    public ulong Seed { get; }

    public SceneStyle Style { get; }

    public double DetailScale { get; }

    /// <summary>Side of the grid cells that hold shapes; a shape never reaches past its neighbouring cells.</summary>
    public double CellSize { get; }

    /// <summary>The scene's gray value (0..255) at (x, y).</summary>
    public double Evaluate(double x, double y) => Evaluate(x, y, null);

    /// <summary>As <see cref="Evaluate(double, double)"/>, reusing the shapes of the last cell neighbourhood.</summary>
    internal double Evaluate(double x, double y, NeighbourhoodCache? cache)
    {
        double v = Style == SceneStyle.EstateMap ? MapGround(x, y) : CourtyardGround(x, y);
        long cx = (long)Math.Floor(x / CellSize);
        long cy = (long)Math.Floor(y / CellSize);
        SceneShape[] shapes;
        if (cache is not null && cache.Valid && cache.CellX == cx && cache.CellY == cy)
        {
            shapes = cache.Shapes;
        }
        else
        {
            shapes = Neighbourhood(cx, cy);
            if (cache is not null)
            {
                cache.Valid = true;
                cache.CellX = cx;
                cache.CellY = cy;
                cache.Shapes = shapes;
            }
        }
        foreach (var shape in shapes)
        {
            v = shape.Over(x, y, v);
        }
        return Math.Clamp(v, 0, 255);
    }

    /// <summary>The shapes of a cell and its eight neighbours, in row-major order of absolute cells.</summary>
    private SceneShape[] Neighbourhood(long cx, long cy)
    {
        var list = new List<SceneShape>(27);
        for (long j = cy - 1; j <= cy + 1; j++)
        {
            for (long i = cx - 1; i <= cx + 1; i++)
            {
                list.AddRange(ShapesOf(i, j));
            }
        }
        return [.. list];
    }

    /// <summary>Remembers the shapes around the last evaluated cell (one per rendering thread).</summary>
    internal sealed class NeighbourhoodCache
    {
        public bool Valid { get; set; }

        public long CellX { get; set; }

        public long CellY { get; set; }

        public SceneShape[] Shapes { get; set; } = [];
    }

    private double MapGround(double x, double y)
    {
        double s = DetailScale;
        double paper = 212 + 36 * (LatticeNoise.Fractal(Seed, 10, x, y, 220 * s, 4) - 0.5);
        paper += 18 * (LatticeNoise.Value(Seed, 20, x, y, 2.5 * s) - 0.5);
        // Contour lines of a smooth height field, drawn about 1.2 units wide.
        double height = LatticeNoise.FractalWithGradient(Seed, 30, x, y, 360 * s, 2, out double gx, out double gy);
        paper -= 95 * IsoLineCoverage(height, gx, gy, 9, 1.2 * s);
        // Hatched low ground, with wobbling hatch lines so the pattern does not repeat exactly.
        if (height < 0.38)
        {
            double phase = (x + y) / (7 * s) + 1.5 * LatticeNoise.Value(Seed, 40, x, y, 30 * s);
            double f = phase - Math.Floor(phase);
            double hatch = Math.Clamp(1 - Math.Abs(f - 0.5) * 7 * s / 0.9, 0, 1);
            paper -= 45 * hatch * Math.Clamp((0.38 - height) * 25, 0, 1);
        }
        return paper;
    }

    private double CourtyardGround(double x, double y)
    {
        double s = DetailScale;
        double stone = 150 + 60 * (LatticeNoise.Fractal(Seed, 50, x, y, 14 * s, 2) - 0.5);
        stone += 40 * (LatticeNoise.Fractal(Seed, 60, x, y, 300 * s, 2) - 0.5);
        stone += 8 * (LatticeNoise.Value(Seed, 70, x, y, 2.0 * s) - 0.5);
        // Irregular joints between paving stones.
        double joints = LatticeNoise.FractalWithGradient(Seed, 80, x, y, 45 * s, 2, out double gx, out double gy);
        stone -= 70 * IsoLineCoverage(joints, gx, gy, 5, 1.0 * s);
        return stone;
    }

    /// <summary>Coverage (0..1) of the iso-lines at multiples of 1/levels of a field, drawn <paramref name="width"/> units wide.</summary>
    private static double IsoLineCoverage(double field, double gx, double gy, int levels, double width)
    {
        double f = field * levels;
        double g = Math.Sqrt(gx * gx + gy * gy) * levels;
        if (g < 1e-12)
        {
            return 0;
        }
        double distance = Math.Abs(f - Math.Round(f)) / g;
        return Math.Clamp(0.5 * width + 0.5 - distance, 0, 1);
    }

    private SceneShape[] ShapesOf(long i, long j) => _cells.GetOrAdd((i, j), key => CreateShapes(key.X, key.Y));

    private SceneShape[] CreateShapes(long i, long j)
    {
        var rng = new SyntheticRandom(LatticeNoise.Hash(Seed, 1000, i, j));
        double c = CellSize;
        double s = DetailScale;
        int count = 1 + (int)(rng.NextDouble() * 2.6);
        var shapes = new SceneShape[count];
        for (int k = 0; k < count; k++)
        {
            double x = (i + rng.NextDouble()) * c;
            double y = (j + rng.NextDouble()) * c;
            double angle = rng.NextDouble() * Math.PI;
            double cos = Math.Cos(angle);
            double sin = Math.Sin(angle);
            double pick = rng.NextDouble();
            double dark = 40 + 70 * rng.NextDouble();
            double light = 185 + 60 * rng.NextDouble();
            SceneShape shape = Style == SceneStyle.EstateMap
                ? pick switch
                {
                    < 0.25 => new SceneShape(ShapeKind.Box, x, y, (3 + 8 * rng.NextDouble()) * s, (2 + 6 * rng.NextDouble()) * s, cos, sin, 0, dark),
                    < 0.45 => new SceneShape(ShapeKind.BoxOutline, x, y, (8 + 10 * rng.NextDouble()) * s, (6 + 8 * rng.NextDouble()) * s, cos, sin, 1.3 * s, dark + 20),
                    < 0.70 => new SceneShape(ShapeKind.Disc, x, y, (1.5 + 3.5 * rng.NextDouble()) * s, 0, 1, 0, 0, dark),
                    < 0.82 => new SceneShape(ShapeKind.Ring, x, y, (4 + 9 * rng.NextDouble()) * s, 0, 1, 0, 1.5 * s, dark + 15),
                    _ => new SceneShape(ShapeKind.Stroke, x, y, (10 + 14 * rng.NextDouble()) * s, 0, cos, sin, (1.5 + 1.5 * rng.NextDouble()) * s, dark + 30),
                }
                : pick switch
                {
                    < 0.35 => new SceneShape(ShapeKind.Box, x, y, (4 + 10 * rng.NextDouble()) * s, (5 + 10 * rng.NextDouble()) * s, cos, sin, 0, rng.NextDouble() < 0.5 ? dark - 20 : light),
                    < 0.55 => new SceneShape(ShapeKind.BoxOutline, x, y, (6 + 10 * rng.NextDouble()) * s, (8 + 8 * rng.NextDouble()) * s, cos, sin, 2 * s, light),
                    < 0.72 => new SceneShape(ShapeKind.Ring, x, y, (5 + 10 * rng.NextDouble()) * s, 0, 1, 0, 2.5 * s, dark),
                    < 0.90 => new SceneShape(ShapeKind.Disc, x, y, (2 + 6 * rng.NextDouble()) * s, 0, 1, 0, 0, 30 + 50 * rng.NextDouble()),
                    _ => new SceneShape(ShapeKind.Stroke, x, y, (8 + 12 * rng.NextDouble()) * s, 0, cos, sin, 2.5 * s, light),
                };
            shapes[k] = shape;
        }
        return shapes;
    }
}
