using System.Globalization;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Demo;
using Seamwright.Pipeline.Output;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Formats.Jpeg;
using SixLabors.ImageSharp.PixelFormats;
using SixLabors.ImageSharp.Processing;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// Large colour frames for the <c>scale --enlarge F</c> benchmark: every tile of a generated grid
/// resized by F (bicubic; 8.85 gives 5664 x 4248, 24 MP), tinted into colour (green x 0.96, blue
/// x 0.90: three real channels to decode) and written as a JPEG of quality 90, with the truth
/// carried over: a pixel p of the small tile is F (p + 0.5) - 0.5 of the large one (pixel centres).
/// The frames are F times blurrier than a camera of that size would give, so their corner errors
/// (in large pixels) say nothing of accuracy on real 24 MP photographs: this is a memory and time
/// workload. Cached beside the small grid.
/// </summary>
internal static class LargeFrames
{
    public static string Ensure(string smallRoot, double factor)
    {
        string root = smallRoot + string.Create(CultureInfo.InvariantCulture, $"-x{factor:0.###}");
        string done = Path.Combine(root, "complete");
        if (File.Exists(done))
        {
            return root;
        }
        string from = Path.Combine(smallRoot, "input", "grid");
        string to = Path.Combine(root, "input", "grid");
        Directory.CreateDirectory(to);
        int width = (int)Math.Round(ScaleGrid.TileWidth * factor), height = (int)Math.Round(ScaleGrid.TileHeight * factor);
        var files = Directory.GetFiles(from, "*.jpg").Order(StringComparer.Ordinal).ToArray();
        Parallel.ForEach(files, new ParallelOptions { MaxDegreeOfParallelism = Math.Min(2, Environment.ProcessorCount) }, file =>
        {
            string target = Path.Combine(to, Path.GetFileName(file));
            if (File.Exists(target))
            {
                return;
            }
            using var small = Image.Load<L8>(file);
            using var large = small.CloneAs<Rgb24>();
            large.Mutate(x => x.Resize(width, height, KnownResamplers.Bicubic));
            large.ProcessPixelRows(rows =>
            {
                for (int y = 0; y < rows.Height; y++)
                {
                    foreach (ref var p in rows.GetRowSpan(y))
                    {
                        p = new Rgb24(p.R, (byte)(p.G * 0.96), (byte)(p.B * 0.90));
                    }
                }
            });
            string temp = target + ".tmp";
            large.SaveAsJpeg(temp, new JpegEncoder { Quality = 90 });
            File.Move(temp, target);
        });
        var truth = DemoTruth.Read(Path.Combine(smallRoot, DemoTruth.FileName));
        var up = Transform2D.Translation(-0.5, -0.5) * Transform2D.Scaling(factor, factor) * Transform2D.Translation(0.5, 0.5);
        var down = up.Inverse();
        var scaled = new DemoTruth(truth.Reference, truth.ToReference.ToDictionary(kv => kv.Key, kv => up * kv.Value * down, StringComparer.Ordinal));
        AtomicFile.WriteAllBytes(Path.Combine(root, DemoTruth.FileName), scaled.ToJson());
        File.WriteAllText(done, string.Create(CultureInfo.InvariantCulture, $"{files.Length} frames of {width} x {height}\n"));
        return root;
    }
}
