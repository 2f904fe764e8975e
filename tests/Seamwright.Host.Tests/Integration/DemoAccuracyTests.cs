using System.Text.Json;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Output;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// The demo measures itself: `run sample-folder` with the real engine, then every image's corners
/// mapped by its sidecar's toReference against the generator's _truth.json (same convention).
/// </summary>
public sealed class DemoAccuracyTests(ITestOutputHelper output)
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(15);

    [Fact]
    public void Run_SampleFolder_EveryImageWithinOnePixelOfTruth()
    {
        string sample = Path.Combine(RepoPaths.Root, "sample-folder");
        var sets = Directory.Exists(sample)
            ? Directory.GetDirectories(sample).Where(d => File.Exists(Path.Combine(d, "_truth.json"))).Order(StringComparer.Ordinal).ToList()
            : [];
        if (sets.Count == 0)
        {
            Assert.False(RepoPaths.IsCi, "sample-folder has no set with _truth.json (regenerate the demo with `seamwright make-demo`)");
            output.WriteLine("SKIPPED: sample-folder has no set with _truth.json.");
            return;
        }
        using var dir = new ScratchFolder();
        var (code, stdout, stderr) = SeamwrightProcess.Run(dir.Path, Limit, "run", sample, "--output", dir.Sub("out"));
        Assert.True(code == 0, stdout + stderr);
        foreach (string setFolder in sets)
        {
            string set = Path.GetFileName(setFolder);
            var truth = ReadTruth(Path.Combine(setFolder, "_truth.json"));
            string outFolder = dir.Sub("out/" + set);
            var sidecars = truth.Keys.ToDictionary(n => n, n => OutputJson.ReadSidecar(Path.Combine(outFolder, n + ".seam.json")));
            string reference = sidecars.Values.Select(s => s.Reference).Distinct().Single()
                ?? throw new InvalidOperationException($"{set}: no reference");
            // Truth re-expressed in our reference's pixels: truth(ours)^-1 * truth(image).
            var toOurs = truth[reference].Inverse();
            double sum = 0, max = 0;
            int n = 0;
            foreach (var (name, sidecar) in sidecars)
            {
                Assert.True(sidecar.ToReference is not null, $"{set}/{name} unplaced");
                var ours = Transform2D.FromRows(sidecar.ToReference!);
                var expected = toOurs * truth[name];
                foreach (var (x, y) in Transform2D.Corners(sidecar.Width, sidecar.Height))
                {
                    var (u, v) = ours.Apply(x, y);
                    var (eu, ev) = expected.Apply(x, y);
                    double d = Math.Sqrt((u - eu) * (u - eu) + (v - ev) * (v - ev));
                    sum += d;
                    max = Math.Max(max, d);
                    n++;
                }
            }
            var manifest = OutputJson.ReadManifest(Path.Combine(outFolder, "seam-manifest.json"));
            output.WriteLine($"{set}: {sidecars.Count} images, reference {reference} (truth: {truth.Keys.First(k => truth[k] == Transform2D.Identity)}), "
                + $"corner error vs truth mean {sum / n:0.000} px, max {max:0.000} px; joint tie RMS {manifest.Alignment?.Residuals?.JointRmsPx} px");
            Assert.True(sum / n < 1.0, $"{set}: mean corner error {sum / n} px");
            Assert.True(File.Exists(Path.Combine(outFolder, "preview.jpg")), $"{set}: no preview");
            Assert.True(File.Exists(Path.Combine(outFolder, "report.html")), $"{set}: no report");
        }
    }

    private static Dictionary<string, Transform2D> ReadTruth(string path)
    {
        using var doc = JsonDocument.Parse(File.ReadAllBytes(path));
        var result = new Dictionary<string, Transform2D>(StringComparer.Ordinal);
        foreach (var p in doc.RootElement.GetProperty("toReference").EnumerateObject())
        {
            var rows = p.Value.EnumerateArray().Select(r => r.EnumerateArray().Select(v => v.GetDouble()).ToArray()).ToArray();
            result[p.Name] = Transform2D.FromRows(rows);
        }
        return result;
    }
}
