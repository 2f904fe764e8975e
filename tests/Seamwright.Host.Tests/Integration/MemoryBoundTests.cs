using System.Globalization;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Output;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// Memory of a set run does not grow with the set: the real `run` on a 4 x 4 and a 10 x 10 grid under
/// a small feature budget, peak resident memory polled from /proc (VmHWM) outside the process.
/// Without the bound every image's features stay in memory until the end, so the larger set would
/// need at least 84 more feature entries (measured from the feature cache it leaves) on top of
/// everything else that grows with the links.
/// </summary>
public sealed class MemoryBoundTests(ITestOutputHelper output)
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(10);
    private const int FeatureMegabytes = 4;

    [Fact]
    public void Run_GridSixTimesLarger_PeakMemoryGrowsFarLessThanItsFeatures()
    {
        if (!OperatingSystem.IsLinux())
        {
            output.WriteLine("SKIPPED: peak resident memory is read from /proc (Linux only).");
            return;
        }
        using var dir = new ScratchFolder();
        var (smallPeak, _) = RunGrid(dir, "small", 4);
        var (largePeak, entryBytes) = RunGrid(dir, "large", 10);
        long extraFeatures = 84 * entryBytes;
        output.WriteLine($"peak RSS: 16 tiles {smallPeak >> 20} MiB, 64 tiles {largePeak >> 20} MiB; mean feature entry {entryBytes >> 10} KiB, "
            + $"84 more images hold {extraFeatures >> 20} MiB of features; budget {FeatureMegabytes} MiB");
        // Held features alone would add extraFeatures; pair results, tie points, outputs in flight and GC slack still grow with links
        // (measured: 53 MiB for these 84 images, RSS noise about 20 MiB), so the bound is what the features alone would add.
        Assert.True(largePeak - smallPeak < extraFeatures,
            $"peak grew by {(largePeak - smallPeak) >> 20} MiB for 84 more images ({extraFeatures >> 20} MiB of features)");
    }

    private (long Peak, long EntryBytes) RunGrid(ScratchFolder dir, string name, int side)
    {
        string input = dir.Sub(name + "/in/grid");
        Directory.CreateDirectory(input);
        var scene = new ProceduralScene(777, SceneStyle.EstateMap);
        Parallel.For(0, side * side, k =>
        {
            int r = k / side, c = k % side;
            var pixels = SceneRenderer.Render(scene, 240, 180, Transform2D.Translation(c * 170.0 + 200, r * 130.0 + 200), samplesPerAxis: 1);
            ImageWriter.WritePng(Path.Combine(input, $"tile_r{r + 1}_c{c + 1}.png"), ImageEffects.AddGaussianNoise(pixels, 1.5, (ulong)k));
        });
        string outDir = dir.Sub(name + "/out");
        using var p = SeamwrightProcess.Start(dir.Path, "run", dir.Sub(name + "/in"), "--output", outDir,
            $"--Seamwright:Service:FeatureMemoryMegabytes={FeatureMegabytes.ToString(CultureInfo.InvariantCulture)}",
            "--Seamwright:Service:MemoryBudgetMegabytes=16");
        long peak = 0;
        var clock = System.Diagnostics.Stopwatch.StartNew();
        while (!p.HasExited && clock.Elapsed < Limit)
        {
            peak = Math.Max(peak, HighWaterMark(p.Id));
            Thread.Sleep(50);
        }
        Assert.True(p.WaitForExit(TimeSpan.FromSeconds(30)), "run did not finish");
        Assert.True(p.ExitCode == 0, p.Output + p.Errors);
        var entries = Directory.GetFiles(Path.Combine(outDir, ".seamwright", "features"), "*.bin", SearchOption.AllDirectories);
        Assert.Equal(side * side, entries.Length);
        return (peak, (long)entries.Average(e => new FileInfo(e).Length));
    }

    private static long HighWaterMark(int pid)
    {
        try
        {
            string? line = File.ReadLines($"/proc/{pid}/status").FirstOrDefault(l => l.StartsWith("VmHWM:", StringComparison.Ordinal));
            return line is null ? 0 : long.Parse(line.Split(' ', StringSplitOptions.RemoveEmptyEntries)[1], CultureInfo.InvariantCulture) * 1024;
        }
        catch (IOException)
        {
            return 0;
        }
    }
}
