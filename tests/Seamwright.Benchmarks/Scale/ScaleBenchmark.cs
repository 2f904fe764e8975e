using System.Globalization;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Demo;
using Seamwright.Pipeline.Output;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// <c>scale N [--sweep] [--enlarge F] [--seed S] [--cache DIR] [--rerun] [--keep] [-- overrides...]</c>: generates
/// (or reuses) a grid of N tiles of 640 x 480 (with <c>--sweep</c> one row of N tiles), runs the real <c>seamwright run</c> on it as a child
/// process and prints wall time, peak resident memory (from /proc, outside the process), time
/// per stage and the median corner error against the generator's truth. With <c>--rerun</c> one
/// tile is then replaced (same view, new sensor noise, as a re-shot tile) and the set run again.
/// With <c>--enlarge F</c> the tiles are resized by F into colour frames (<see cref="LargeFrames"/>;
/// 8.85 gives 24 MP), a memory and time workload (not with <c>--rerun</c>).
/// Settings overrides after the options are passed to <c>run</c> (e.g.
/// <c>--Seamwright:Service:MaxParallelJobs=1</c>).
/// </summary>
internal static class ScaleBenchmark
{
    public static int Run(string[] args)
    {
        if (args.Length == 0 || !int.TryParse(args[0], CultureInfo.InvariantCulture, out int n) || n < 4)
        {
            Console.Error.WriteLine("usage: scale N [--sweep] [--enlarge F] [--seed S] [--cache DIR] [--rerun] [--keep] [--Seamwright:...=value ...]");
            return 2;
        }
        ulong seed = 11;
        string cache = Path.Combine(Path.GetTempPath(), "seamwright-scale");
        bool rerun = false, keep = false, sweep = false;
        double enlarge = 1;
        var overrides = new List<string>();
        for (int i = 1; i < args.Length; i++)
        {
            switch (args[i])
            {
                case "--seed": seed = ulong.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--cache": cache = args[++i]; break;
                case "--rerun": rerun = true; break;
                case "--keep": keep = true; break;
                case "--sweep": sweep = true; break;
                case "--enlarge": enlarge = double.Parse(args[++i], CultureInfo.InvariantCulture); break;
                default: overrides.Add(args[i]); break;
            }
        }
        if (enlarge != 1 && (rerun || !(enlarge > 1)))
        {
            Console.Error.WriteLine("--enlarge takes a factor above 1 and does not combine with --rerun");
            return 2;
        }
        var clock = System.Diagnostics.Stopwatch.StartNew();
        string grid = ScaleGrid.Ensure(n, seed, cache, sweep);
        if (enlarge > 1)
        {
            grid = LargeFrames.Ensure(grid, enlarge);
        }
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"grid: {n} tiles of {Math.Round(ScaleGrid.TileWidth * enlarge)}x{Math.Round(ScaleGrid.TileHeight * enlarge)} in {grid} (ready in {clock.Elapsed.TotalSeconds:0.0} s)"));
        string work = Path.Combine(cache, "work-" + Environment.ProcessId.ToString(CultureInfo.InvariantCulture));
        string input = Path.Combine(work, "input");
        string output = Path.Combine(work, "out");
        LinkInputs(Path.Combine(grid, "input"), input);
        string dll = ScaleProcess.Dll(RepoPaths.Root);
        try
        {
            var first = RunOnce("first run", dll, input, output, overrides);
            if (first is null)
            {
                return 1;
            }
            Accuracy(grid, output);
            if (rerun)
            {
                ReplaceOneTile(n, seed, input, sweep);
                var second = RunOnce("rerun, one tile replaced", dll, input, output, overrides);
                if (second is null)
                {
                    return 1;
                }
                Console.WriteLine($"rerun / first run wall time: {second.Value.TotalSeconds / first.Value.TotalSeconds:0.000}");
                Accuracy(grid, output);
            }
            return 0;
        }
        finally
        {
            if (!keep)
            {
                Directory.Delete(work, recursive: true);
            }
            else
            {
                Console.WriteLine($"kept {work}");
            }
        }
    }

    private static TimeSpan? RunOnce(string label, string dll, string input, string output, List<string> overrides)
    {
        var since = DateTimeOffset.UtcNow.AddSeconds(-1);
        var result = ScaleProcess.Run(dll, ["run", input, "--output", output, .. overrides]);
        Console.WriteLine($"{label}: exit {result.ExitCode}, wall {result.Wall.TotalSeconds:0.0} s, peak RSS {result.PeakRssBytes / 1048576.0:0} MiB");
        if (result.ExitCode != 0)
        {
            Console.WriteLine(result.Output);
            Console.WriteLine(result.Errors);
            return null;
        }
        if (StageTimes.FromLogs(output, since) is { } s)
        {
            Console.WriteLine($"  stages: images {s.ImagesS:0.0} s ({s.Images} images, {s.ImagesFromCache} from the feature cache), "
                + $"pairs {s.PairsS:0.0} s ({s.Pairs} pairs, {s.PairsEstimated} estimated), alignment + outputs {s.AlignAndOutputsS:0.0} s");
            if (s.SetModelS is double align)
            {
                Console.WriteLine($"  set model and alignment {align:0.00} s (overlap planning {s.PlanningS:0.00} s) = {100 * align / s.TotalS:0.0} % of the set's {s.TotalS:0.0} s; preview and report {s.VisualsS:0.00} s");
            }
        }
        foreach (string line in result.Output.Split('\n').Where(l => l.Contains("grid:", StringComparison.Ordinal) || l.Contains("pairs would", StringComparison.Ordinal)))
        {
            Console.WriteLine("  " + line.Trim());
        }
        return result.Wall;
    }

    /// <summary>Copies of the cached tiles, so a replaced tile never touches the cache.</summary>
    private static void LinkInputs(string from, string to)
    {
        foreach (string dir in Directory.GetDirectories(from))
        {
            string target = Path.Combine(to, Path.GetFileName(dir));
            Directory.CreateDirectory(target);
            foreach (string file in Directory.GetFiles(dir))
            {
                File.Copy(file, Path.Combine(target, Path.GetFileName(file)));
            }
        }
    }

    /// <summary>The middle tile of the first row rendered again with other noise (a re-shot tile).</summary>
    private static void ReplaceOneTile(int n, ulong seed, string input, bool sweep)
    {
        var tiles = ScaleGrid.Layout(n, seed, sweep);
        var t = tiles[Math.Min(n - 1, ScaleGrid.Columns(n, sweep) / 2)];
        var scene = new ProceduralScene(seed, SceneStyle.EstateMap);
        var pixels = SceneRenderer.Render(scene, ScaleGrid.TileWidth, ScaleGrid.TileHeight, t.ToScene, samplesPerAxis: 1);
        pixels = ImageEffects.AdjustBrightnessContrast(pixels, t.Contrast, t.Brightness);
        pixels = ImageEffects.AddGaussianNoise(pixels, 1.5, t.NoiseSeed + 7_777_777UL);
        string path = Path.Combine(input, "grid", t.Name);
        File.Delete(path);
        ImageWriter.Write(path, pixels, 90);
        Console.WriteLine($"replaced {t.Name}");
    }

    /// <summary>Corner error of every placed tile against the truth, in our reference's pixels (as the demo accuracy test).</summary>
    private static void Accuracy(string grid, string output)
    {
        var truth = DemoTruth.Read(Path.Combine(grid, DemoTruth.FileName));
        string setOut = Path.Combine(output, "grid");
        var errors = new List<double>();
        int unplaced = 0;
        Transform2D? toOurs = null;
        foreach (var (name, t) in truth.ToReference)
        {
            string path = Path.Combine(setOut, name + ".seam.json");
            if (!File.Exists(path))
            {
                unplaced++;
                continue;
            }
            var sidecar = OutputJson.ReadSidecar(path);
            if (sidecar.ToReference is null || sidecar.Reference is null)
            {
                unplaced++;
                continue;
            }
            toOurs ??= truth.ToReference[sidecar.Reference].Inverse();
            var ours = Transform2D.FromRows(sidecar.ToReference);
            var expected = toOurs.Value * t;
            foreach (var (x, y) in Transform2D.Corners(sidecar.Width, sidecar.Height))
            {
                var (u, v) = ours.Apply(x, y);
                var (eu, ev) = expected.Apply(x, y);
                errors.Add(Math.Sqrt((u - eu) * (u - eu) + (v - ev) * (v - ev)));
            }
        }
        errors.Sort();
        double median = errors.Count == 0 ? double.NaN : errors[errors.Count / 2];
        double p95 = errors.Count == 0 ? double.NaN : errors[(int)(errors.Count * 0.95)];
        Console.WriteLine($"  accuracy: {truth.ToReference.Count - unplaced} placed, {unplaced} unplaced; corner error median {median:0.000} px, 95th percentile {p95:0.000} px, max {(errors.Count == 0 ? double.NaN : errors[^1]):0.000} px");
    }
}
