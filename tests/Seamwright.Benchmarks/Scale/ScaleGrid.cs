using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Demo;
using Seamwright.Pipeline.Output;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// A generated grid of N overlapping tiles for the <c>scale</c> benchmark, rendered with the
/// project's own procedural scene (estate-map style) and written as JPEGs with a
/// <c>_truth.json</c> in the demo's convention. Each tile is placed on a regular pitch (about
/// 30 % overlap) with a seeded small rotation, scale and shift, like a sheet shifting on a
/// scanner bed. With <c>sweep</c> the N tiles form one row (a long flat sweep, issue 10's
/// 100-frame case) on the same pitch. Rendering costs about a microsecond per sample, so tiles use one sample per
/// pixel and the grid is cached on disk under /tmp, keyed by N, size and seed.
/// </summary>
internal static class ScaleGrid
{
    public const int TileWidth = 640;
    public const int TileHeight = 480;

    /// <summary>Columns of the grid for N tiles: the near-square layout, rows filled first.</summary>
    public static int Columns(int n, bool sweep = false) => sweep ? n : (int)Math.Ceiling(Math.Sqrt(n));

    public static string Name(int row, int col) => $"t_r{row + 1:000}_c{col + 1:000}.jpg";

    /// <summary>The cached grid folder (the set is its subfolder <c>grid</c>); rendered when missing.</summary>
    public static string Ensure(int n, ulong seed, string cacheRoot, bool sweep = false)
    {
        string root = Path.Combine(cacheRoot, $"{(sweep ? "sweep" : "grid")}-{n}-{TileWidth}x{TileHeight}-s{seed}");
        string set = Path.Combine(root, "input", "grid");
        string done = Path.Combine(root, "complete");
        if (File.Exists(done))
        {
            return root;
        }
        Directory.CreateDirectory(set);
        var tiles = Layout(n, seed, sweep);
        var scene = new ProceduralScene(seed, SceneStyle.EstateMap);
        int rendered = 0;
        var clock = System.Diagnostics.Stopwatch.StartNew();
        Parallel.ForEach(tiles, new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount }, t =>
        {
            string path = Path.Combine(set, t.Name);
            if (File.Exists(path))
            {
                return;
            }
            var pixels = SceneRenderer.Render(scene, TileWidth, TileHeight, t.ToScene, samplesPerAxis: 1);
            pixels = ImageEffects.AdjustBrightnessContrast(pixels, t.Contrast, t.Brightness);
            pixels = ImageEffects.AddGaussianNoise(pixels, 1.5, t.NoiseSeed);
            ImageWriter.Write(path, pixels, 90);
            int k = Interlocked.Increment(ref rendered);
            if (k % 100 == 0)
            {
                Console.Error.WriteLine($"  rendered {k} / {n} tiles ({clock.Elapsed.TotalSeconds:0} s)");
            }
        });
        var reference = tiles[Index(n, (Rows(n, sweep) - 1) / 2, (Columns(n, sweep) - 1) / 2, sweep)];
        var toRef = reference.ToScene.Inverse();
        var truth = new DemoTruth(reference.Name, tiles.ToDictionary(t => t.Name, t => t.Name == reference.Name ? Transform2D.Identity : toRef * t.ToScene, StringComparer.Ordinal));
        AtomicFile.WriteAllBytes(Path.Combine(root, DemoTruth.FileName), truth.ToJson());
        File.WriteAllText(done, $"{n} tiles\n");
        return root;
    }

    public static int Rows(int n, bool sweep = false) => (n + Columns(n, sweep) - 1) / Columns(n, sweep);

    private static int Index(int n, int row, int col, bool sweep) => Math.Min(n - 1, row * Columns(n, sweep) + col);

    internal sealed record Tile(string Name, Transform2D ToScene, double Contrast, double Brightness, ulong NoiseSeed);

    /// <summary>Placement of every tile (row-major): pitch 448 x 336 px (30 % overlap), rotation up to 1 degree, scale within 1 %, shift up to 8 px.</summary>
    public static List<Tile> Layout(int n, ulong seed, bool sweep = false)
    {
        int cols = Columns(n, sweep);
        var rng = new Xoshiro256StarStar(seed ^ 0x5CA1E0000000000UL);
        double U() => 2 * rng.NextDouble() - 1;
        var tiles = new List<Tile>(n);
        for (int k = 0; k < n; k++)
        {
            int r = k / cols, c = k % cols;
            double angle = U() * Math.PI / 180, scale = 1 + 0.01 * U(), dx = 8 * U(), dy = 8 * U();
            double contrast = 1 + 0.04 * U(), brightness = 4 * U();
            var toScene = Transform2D.Translation(c * 448.0 + dx + 5000, r * 336.0 + dy + 5000)
                * ViewTransforms.SimilarityAbout((TileWidth - 1) / 2.0, (TileHeight - 1) / 2.0, scale, angle);
            tiles.Add(new Tile(Name(r, c), toScene, contrast, brightness, seed * 100_003UL + (ulong)k));
        }
        return tiles;
    }
}
