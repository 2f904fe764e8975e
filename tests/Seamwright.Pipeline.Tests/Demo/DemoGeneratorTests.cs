using Seamwright.Core.Cameras;
using Seamwright.Core.Geometry;
using Seamwright.Core.Imaging;
using Seamwright.Pipeline.Demo;
using Seamwright.Pipeline.Loading;
using Seamwright.Tests.Shared;

namespace Seamwright.Pipeline.Tests.Demo;

/// <summary>The committed sample-folder must be what the generator makes, and its truth must match its pixels.</summary>
public sealed class DemoGeneratorTests : IDisposable
{
    private static readonly string SampleFolder = Path.Combine(RepoPaths.Root, "sample-folder");
    private readonly TempFolder _folder = new();

    [Fact]
    public void Generate_Again_GivesByteIdenticalTruthAndImages()
    {
        // Rendering every image takes minutes in a Debug build; one perspective frame, one
        // rotated tile and every truth file cover both sets.
        string[] sampled = ["frame_05.jpg", "tile_r3_c1.jpg", "turn_07.jpg"];
        var written = DemoGenerator.Generate(_folder.Path, name => sampled.Contains(name));
        Assert.Equal(sampled.Length + DemoGenerator.Sets.Count, written.Count);
        foreach (string path in written)
        {
            string relative = Path.GetRelativePath(_folder.Path, path);
            string committed = Path.Combine(SampleFolder, relative);
            Assert.True(File.Exists(committed), $"{relative} is missing from sample-folder; run: seamwright make-demo sample-folder");
            bool same = File.ReadAllBytes(committed).AsSpan().SequenceEqual(File.ReadAllBytes(path));
            if (MadeOnThisPlatform)
            {
                Assert.True(same, $"{relative} differs from sample-folder; regenerate with: seamwright make-demo sample-folder");
            }
            else if (!same)
            {
                // Other platforms may differ in the last bit of sin/cos/exp or in SIMD paths of the
                // JPEG encoder; the content must still be the same.
                AssertNearlySame(committed, path);
            }
        }
    }

    /// <summary>The committed files were made on Linux x64; byte identity is promised for the same platform and build.</summary>
    private static bool MadeOnThisPlatform =>
        OperatingSystem.IsLinux() && System.Runtime.InteropServices.RuntimeInformation.OSArchitecture == System.Runtime.InteropServices.Architecture.X64;

    private static void AssertNearlySame(string committed, string regenerated)
    {
        if (committed.EndsWith(".json", StringComparison.Ordinal))
        {
            var a = DemoTruth.Read(committed);
            var b = DemoTruth.Read(regenerated);
            foreach (var (name, t) in a.ToReference)
            {
                Assert.True(Transform2D.MaxPointDistance(t, b.ToReference[name], Transform2D.Corners(DemoGenerator.ImageWidth, DemoGenerator.ImageHeight)) < 1e-6, name);
            }
            foreach (var (name, c) in a.Cameras)
            {
                Assert.True(Matrix3.AngleBetween(c.Rotation, b.Cameras[name].Rotation) < 1e-9 && Math.Abs(c.FocalPx - b.Cameras[name].FocalPx) < 1e-9, name);
            }
            return;
        }
        var loader = new ImageLoader();
        var x = loader.Load(committed).Image.Pixels;
        var y = loader.Load(regenerated).Image.Pixels;
        Assert.Equal(x.Length, y.Length);
        int worst = 0;
        long sum = 0;
        for (int i = 0; i < x.Length; i++)
        {
            int d = Math.Abs(x[i] - y[i]);
            worst = Math.Max(worst, d);
            sum += d;
        }
        Assert.True(worst <= 3 && sum < x.Length / 20, $"{regenerated}: worst {worst}, mean {(double)sum / x.Length}");
    }

    [Fact]
    public void SampleFolder_EveryImage_IsListedInTruthAndNothingElse()
    {
        foreach (var set in DemoGenerator.Sets)
        {
            string folder = Path.Combine(SampleFolder, set.Name);
            var truth = DemoTruth.Read(Path.Combine(folder, DemoTruth.FileName));
            var files = Directory.GetFiles(folder, "*.jpg").Select(Path.GetFileName).Order(StringComparer.Ordinal);
            // Camera sets list every frame under cameras, and under toReference those in front of the reference.
            Assert.Equal(files, (truth.Cameras.Count > 0 ? truth.Cameras.Keys : truth.ToReference.Keys).Order(StringComparer.Ordinal));
            Assert.All(truth.ToReference.Keys, k => Assert.Contains(k, files));
            Assert.Equal(Transform2D.Identity, truth.ToReference[truth.Reference]);
            Assert.True(set.Images.Count >= 5);
        }
    }

    [Theory]
    [InlineData("estate-map-tiles")]
    [InlineData("courtyard-pan")]
    [InlineData("lantern-gallery-turn")]
    public void SampleFolder_TruthTransforms_AlignCommittedPixels(string setName)
    {
        // Pixels of each image and of the reference at the mapped points must agree (normalised
        // cross-correlation, which ignores the exposure changes); a transform off by 2 px must not.
        string folder = Path.Combine(SampleFolder, setName);
        var truth = DemoTruth.Read(Path.Combine(folder, DemoTruth.FileName));
        var loader = new ImageLoader();
        var reference = loader.Load(Path.Combine(folder, truth.Reference)).Image;
        foreach (var (name, toReference) in truth.ToReference)
        {
            if (name == truth.Reference)
            {
                continue;
            }
            var image = loader.Load(Path.Combine(folder, name)).Image;
            double exact = Correlation(image, reference, toReference, out int count);
            Assert.True(count > 2000, $"{name}: only {count} points overlap the reference");
            Assert.True(exact > 0.9, $"{name}: correlation {exact:0.000} with the true transform");
            foreach (var (dx, dy) in new[] { (2.0, 0.0), (-2.0, 0.0), (0.0, 2.0), (0.0, -2.0) })
            {
                double shifted = Correlation(image, reference, Transform2D.Translation(dx, dy) * toReference, out _);
                Assert.True(shifted < exact - 0.1, $"{name}: shifted by ({dx}, {dy}) {shifted:0.000} vs true {exact:0.000}");
            }
        }
    }

    private static double Correlation(GrayImage image, GrayImage reference, Transform2D toReference, out int count)
    {
        var a = new List<double>();
        var b = new List<double>();
        for (int y = 5; y < image.Height - 5; y += 3)
        {
            for (int x = 5; x < image.Width - 5; x += 3)
            {
                var (u, v) = toReference.Apply(x, y);
                if (BilinearSampler.TrySample(reference, u, v, out float r) && u > 3 && v > 3 && u < reference.Width - 4 && v < reference.Height - 4)
                {
                    a.Add(image[x, y]);
                    b.Add(r);
                }
            }
        }
        count = a.Count;
        double ma = a.Average(), mb = b.Average();
        double sab = 0, saa = 0, sbb = 0;
        for (int i = 0; i < a.Count; i++)
        {
            sab += (a[i] - ma) * (b[i] - mb);
            saa += (a[i] - ma) * (a[i] - ma);
            sbb += (b[i] - mb) * (b[i] - mb);
        }
        return sab / Math.Sqrt(saa * sbb);
    }

    [Fact]
    public void DemoTruth_WriteThenRead_RoundTripsExactly()
    {
        var set = DemoGenerator.Sets[1];
        var truth = DemoTruth.From(set);
        string path = _folder.File(DemoTruth.FileName);
        truth.Write(path);
        var back = DemoTruth.Read(path);
        Assert.Equal(truth.Reference, back.Reference);
        foreach (var (name, t) in truth.ToReference)
        {
            Assert.Equal(t, back.ToReference[name]);
        }
    }

    public void Dispose() => _folder.Dispose();
}
