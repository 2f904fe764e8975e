using System.Text.Json;
using Seamwright.Core.Cameras;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Demo;
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
            string outFolder = dir.Sub("out/" + set);
            if (CheckCameras(set, Path.Combine(setFolder, "_truth.json"), outFolder))
            {
                continue;
            }
            var truth = ReadTruth(Path.Combine(setFolder, "_truth.json"));
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

    /// <summary>
    /// A set of a camera turning about its centre (truth has "cameras"): every frame placed with a
    /// camera block, relative rotation between every two frames within 0.02 degrees median and 0.1
    /// worst, focal length within 0.3 % (issue 10 targets). False for other sets.
    /// </summary>
    private bool CheckCameras(string set, string truthPath, string outFolder)
    {
        var truth = DemoTruth.Read(truthPath);
        if (truth.Cameras.Count == 0)
        {
            return false;
        }
        var names = truth.Cameras.Keys.Order(StringComparer.Ordinal).ToArray();
        var ours = names.ToDictionary(n => n, n => OutputJson.ReadSidecar(Path.Combine(outFolder, n + ".seam.json")).Camera);
        Assert.All(names, n => Assert.True(ours[n] is not null, $"{set}/{n}: no camera block"));
        var rotation = names.ToDictionary(n => n, n => Matrix3.FromRowMajor([.. ours[n]!.Rotation.SelectMany(r => r)]));
        var errors = new List<double>();
        for (int i = 0; i < names.Length; i++)
        {
            for (int j = i + 1; j < names.Length; j++)
            {
                var estimated = rotation[names[i]].Transpose() * rotation[names[j]];
                var expected = truth.Cameras[names[i]].Rotation.Transpose() * truth.Cameras[names[j]].Rotation;
                errors.Add(Matrix3.AngleBetween(estimated, expected) * 180 / Math.PI);
            }
        }
        errors.Sort();
        double median = errors[errors.Count / 2], worst = errors[^1];
        double focalError = names.Max(n => Math.Abs(ours[n]!.FocalPx / truth.Cameras[n].FocalPx - 1));
        var manifest = OutputJson.ReadManifest(Path.Combine(outFolder, "seam-manifest.json"));
        output.WriteLine($"{set}: {names.Length} frames, set model {manifest.Alignment?.SetModel?.Model}, relative rotation error median {median:0.0000} deg, "
            + $"worst {worst:0.0000} deg, focal error {100 * focalError:0.000} %, projection {manifest.Alignment?.SetModel?.Projection?.Name}");
        Assert.Equal("rotation", manifest.Alignment?.SetModel?.Model);
        Assert.True(median <= 0.02, $"{set}: median relative rotation error {median} deg");
        Assert.True(worst <= 0.1, $"{set}: worst relative rotation error {worst} deg");
        Assert.True(focalError <= 0.003, $"{set}: focal error {focalError}");
        Assert.True(File.Exists(Path.Combine(outFolder, "preview.jpg")), $"{set}: no preview");
        return true;
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
