using System.Globalization;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Output;
using Seamwright.Tests.Shared;

namespace Seamwright.Benchmarks.Scale;

/// <summary>
/// <c>shoots [W H] [--samples N] [--only NAME] [--cache DIR] [-- overrides...]</c>: the four
/// rotating-camera shoots of issue 10 (<see cref="RotationShoot"/>: full turn, two rows, 150
/// degree pan through a k1 = -0.1 lens, rows with a zenith frame) rendered by our own renderer
/// at W x H (default 960 x 720, 2 x 2 samples per pixel; cached under the cache folder), each
/// run through the real <c>seamwright run</c> as a child process, scored from its sidecars and
/// manifest against the render's truth, with the time the set model and alignment took as a
/// share of the set's time (from the run's log). Settings overrides are passed to <c>run</c>.
/// </summary>
internal static class ShootsBenchmark
{
    public static int Run(string[] args)
    {
        int width = 960, height = 720, samples = 2;
        string cache = Path.Combine(Path.GetTempPath(), "seamwright-shoots");
        string? only = null;
        var overrides = new List<string>();
        var sizes = new List<int>();
        for (int i = 0; i < args.Length; i++)
        {
            switch (args[i])
            {
                case "--samples": samples = int.Parse(args[++i], CultureInfo.InvariantCulture); break;
                case "--cache": cache = args[++i]; break;
                case "--only": only = args[++i]; break;
                default:
                    if (int.TryParse(args[i], CultureInfo.InvariantCulture, out int v))
                    {
                        sizes.Add(v);
                    }
                    else
                    {
                        overrides.Add(args[i]);
                    }
                    break;
            }
        }
        if (sizes.Count == 2)
        {
            (width, height) = (sizes[0], sizes[1]);
        }
        string dll = ScaleProcess.Dll(RepoPaths.Root);
        var rows = new List<string>();
        int failures = 0;
        foreach (var shoot in RotationShoot.All(width, height).Where(s => only is null || s.Name == only))
        {
            string root = Render(shoot, Path.Combine(cache, string.Create(CultureInfo.InvariantCulture, $"{width}x{height}-s{samples}")), samples);
            string output = Path.Combine(cache, "out-" + Environment.ProcessId.ToString(CultureInfo.InvariantCulture), shoot.Name);
            var since = DateTimeOffset.UtcNow.AddSeconds(-1);
            var result = ScaleProcess.Run(dll, ["run", root, "--output", output, .. overrides]);
            var score = RotationShootScore.Read(shoot, Path.Combine(output, shoot.Name));
            var times = StageTimes.FromLogs(output, since);
            Console.WriteLine($"{shoot.Name}: exit {result.ExitCode}, wall {result.Wall.TotalSeconds:0.0} s; {score}");
            if (result.ExitCode != 0)
            {
                failures++;
                Console.WriteLine(result.Output);
                Console.WriteLine(result.Errors);
            }
            string share = times?.SetModelS is double align && times.TotalS > 0
                ? string.Create(CultureInfo.InvariantCulture, $"{align:0.00} s of {times.TotalS:0.0} s ({100 * align / times.TotalS:0.0} %)")
                : "n/a";
            rows.Add(string.Create(CultureInfo.InvariantCulture,
                $"| {shoot.Name} ({shoot.Count}) | {score.SetModel} | {score.Placed} / {score.Frames} | {score.MedianDeg:0.0000} | {score.WorstDeg:0.0000} | {100 * score.FocalError:0.000} % | {score.K1:0.0000} (truth {shoot.Lens.K1:0.0}) | {result.ExitCode} | {share} |"));
            Directory.Delete(Path.GetDirectoryName(output)!, recursive: true);
        }
        Console.WriteLine();
        Console.WriteLine($"frames {width} x {height}, {samples} x {samples} samples per pixel; relative rotation error over every two frames, degrees");
        Console.WriteLine("| shoot | set model | placed | median | worst | focal error | k1 | exit | set model and alignment |");
        Console.WriteLine("|---|---|---:|---:|---:|---:|---:|---:|---:|");
        rows.ForEach(Console.WriteLine);
        return failures == 0 ? 0 : 1;
    }

    /// <summary>The shoot's frames as JPEG files in <c>folder/name/input/name/</c> (rendered once), returns the input root.</summary>
    private static string Render(RotationShoot shoot, string folder, int samples)
    {
        string root = Path.Combine(folder, shoot.Name, "input");
        string set = Path.Combine(root, shoot.Name);
        string done = Path.Combine(folder, shoot.Name, "complete");
        if (File.Exists(done))
        {
            return root;
        }
        Directory.CreateDirectory(set);
        var clock = System.Diagnostics.Stopwatch.StartNew();
        Parallel.For(0, shoot.Count, i => ImageWriter.Write(Path.Combine(set, shoot.FileName(i)), shoot.Render(i, samples), 90));
        File.WriteAllText(done, "");
        Console.WriteLine($"{shoot.Name}: rendered {shoot.Count} frames of {shoot.Width} x {shoot.Height} in {clock.Elapsed.TotalSeconds:0.0} s");
        return root;
    }
}
