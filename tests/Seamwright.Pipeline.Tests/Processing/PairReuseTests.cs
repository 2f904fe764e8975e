using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Processing;

/// <summary>
/// The pair-result cache: after an image is replaced, added or removed only the pairs involving it
/// are estimated (counted by a decorator around the real engine), and the set's outputs equal
/// those of a clean run on the same inputs byte for byte (apart from the run number).
/// </summary>
public sealed partial class PairReuseTests
{
    private const int W = 240, H = 180;

    [Fact]
    public void Rerun_ImageReplaced_OnlyItsPairsEstimatedAndOutputsEqualCleanRun()
    {
        using var dir = new ScratchFolder();
        WriteGrid(dir.Sub("in/g"), 3, 3);
        var (session, engine) = Open(dir.Sub("in"), dir.Sub("out"));
        using (session)
        {
            Process(session);
            Assert.Equal(12, engine.Estimates); // 3 x 3 grid: 6 horizontal + 6 vertical links
            WriteTile(dir.Sub("in/g"), 1, 1, noiseSeed: 777); // the middle tile re-shot
            Assert.Equal(new PairRedoCount(12, 4, 1), PairRedoPreview.Count(session.Context, session.Catalog.Discover().Single()));
            engine.Estimates = 0;
            Process(session);
            Assert.Equal(4, engine.Estimates); // its four neighbours only
        }
        AssertEqualsCleanRun(dir, "g");
    }

    [Fact]
    public void Rerun_ImageReplaced_ReadsFeaturesOnlyOfTheImagesItsPairsNeed()
    {
        using var dir = new ScratchFolder();
        WriteGrid(dir.Sub("in/g"), 3, 3);
        // One worker: two workers missing the same image at once may both read it (FeatureLru), which would blur the count.
        var (session, engine) = Open(dir.Sub("in"), dir.Sub("out"), workers: 1);
        using (session)
        {
            Process(session);
            WriteTile(dir.Sub("in/g"), 1, 1, noiseSeed: 777);
            engine.Decodes = 0;
            Process(session);
            Assert.Equal(4, engine.Estimates - 12);
            // The new middle tile and its four neighbours, once each; the four corners are not read at all.
            Assert.Equal(5, engine.Decodes);
            string corner = ImageStage.HashFile(dir.Sub("in/g/" + Name(0, 0))) + ".sum";
            string summary = Directory.GetFiles(dir.Sub("out/.seamwright/features"), corner, SearchOption.AllDirectories).Single();
            File.Delete(summary);
            WriteTile(dir.Sub("in/g"), 1, 1, noiseSeed: 778);
            engine.Decodes = 0;
            Process(session);
            Assert.Equal(6, engine.Decodes); // the corner's summary gone: its entry is decoded once and the summary written again
            Assert.True(File.Exists(summary));
        }
        AssertEqualsCleanRun(dir, "g");
    }

    [Fact]
    public void Rerun_ImageAddedThenRemoved_OnlyNewPairsEstimatedAndOutputsEqualCleanRun()
    {
        using var dir = new ScratchFolder();
        WriteGrid(dir.Sub("in/g"), 3, 2);
        var (session, engine) = Open(dir.Sub("in"), dir.Sub("out"));
        using (session)
        {
            Process(session);
            Assert.Equal(7, engine.Estimates); // 2 rows of 3: 4 horizontal + 3 vertical
            WriteTile(dir.Sub("in/g"), 0, 3, noiseSeed: 5); // a fourth column tile in the first row
            engine.Estimates = 0;
            Process(session);
            Assert.Equal(1, engine.Estimates); // r1c3 - r1c4 (no r2c4)
            AssertEqualsCleanRun(dir, "g");

            File.Delete(dir.Sub("in/g/" + Name(1, 0)));
            engine.Estimates = 0;
            Process(session);
            Assert.Equal(0, engine.Estimates); // its pairs just leave the plan
        }
        AssertEqualsCleanRun(dir, "g");
    }

    [Fact]
    public void Process_TinyFeatureMemoryOneWorker_OutputsEqualDefaultTwoWorkers()
    {
        using var dir = new ScratchFolder();
        WriteGrid(dir.Sub("in/g"), 3, 3);
        var (wide, _) = Open(dir.Sub("in"), dir.Sub("out"));
        using (wide)
        {
            Process(wide);
        }
        // 1 MB holds hardly any entry: pairs read their images back from the feature cache again and again.
        var (tight, _) = Open(dir.Sub("in"), dir.Sub("tight"), featureMegabytes: 1, workers: 1);
        using (tight)
        {
            Process(tight);
        }
        var a = OutputFiles(dir.Sub("out/g"));
        var b = OutputFiles(dir.Sub("tight/g"));
        Assert.Equal(a.Keys.Order(StringComparer.Ordinal), b.Keys.Order(StringComparer.Ordinal));
        // The report and manifest carry the time they were written (the manifest also the report's hash): compared without it.
        Assert.All(a.Where(kv => kv.Key != OutputLayout.ManifestName), kv => Assert.True(kv.Key.EndsWith(".jpg", StringComparison.Ordinal)
            ? kv.Value.AsSpan().SequenceEqual(b[kv.Key])
            : Normalise(System.Text.Encoding.UTF8.GetString(kv.Value)) == Normalise(System.Text.Encoding.UTF8.GetString(b[kv.Key])), kv.Key + " differs"));
    }

    [Fact]
    public void Rerun_AlignmentSettingChanged_NoPairEstimated()
    {
        using var dir = new ScratchFolder();
        WriteGrid(dir.Sub("in/g"), 2, 2);
        var (session, engine) = Open(dir.Sub("in"), dir.Sub("out"));
        using (session)
        {
            Process(session);
            Assert.Equal(4, engine.Estimates);
            session.Context.Options.Profile("default").Alignment.RobustScalePx *= 2;
            var set = session.Catalog.Discover().Single();
            Assert.False(session.Context.IsUpToDate(set)); // the set fingerprint changed ...
            engine.Estimates = 0;
            Process(session);
            Assert.Equal(0, engine.Estimates); // ... but no pair did
        }
    }

    [Fact]
    public void Rerun_DamagedPairEntry_RecomputedWithSameOutputs()
    {
        using var dir = new ScratchFolder();
        WriteGrid(dir.Sub("in/g"), 2, 2);
        var (session, engine) = Open(dir.Sub("in"), dir.Sub("out"));
        using (session)
        {
            Process(session);
            string first = File.ReadAllText(dir.Sub("out/g/" + Name(0, 0) + ".seam.json"));
            var entries = Directory.GetFiles(dir.Sub("out/.seamwright/pairs"), "*.bin", SearchOption.AllDirectories).Order(StringComparer.Ordinal).ToArray();
            Assert.Equal(4, entries.Length);
            byte[] bytes = File.ReadAllBytes(entries[0]);
            bytes[bytes.Length / 2] ^= 0x40;
            File.WriteAllBytes(entries[0], bytes);
            File.WriteAllBytes(entries[1], bytes[..10]);
            engine.Estimates = 0;
            new SetProcessor(session.Context).Process(session.Catalog.Discover().Single(), false, CancellationToken.None);
            Assert.Equal(2, engine.Estimates);
            string second = File.ReadAllText(dir.Sub("out/g/" + Name(0, 0) + ".seam.json"));
            Assert.Equal(Normalise(first), Normalise(second));
        }
    }

    private static void AssertEqualsCleanRun(ScratchFolder dir, string setId)
    {
        string clean = dir.Sub("clean-" + Guid.NewGuid().ToString("N")[..8]);
        var (session, engine) = Open(dir.Sub("in"), clean);
        using (session)
        {
            Process(session);
            Assert.True(engine.Estimates > 0);
        }
        var reused = OutputFiles(Path.Combine(dir.Sub("out"), setId));
        var fresh = OutputFiles(Path.Combine(clean, setId));
        Assert.Equal(fresh.Keys.Order(StringComparer.Ordinal), reused.Keys.Order(StringComparer.Ordinal));
        foreach (var (name, bytes) in fresh)
        {
            if (name == OutputLayout.ManifestName)
            {
                continue; // lists the hashes of files that carry the run number; every file is compared itself
            }
            if (name.EndsWith(".jpg", StringComparison.Ordinal))
            {
                Assert.True(bytes.AsSpan().SequenceEqual(reused[name]), $"{name} differs from a clean run");
            }
            else
            {
                string a = Normalise(System.Text.Encoding.UTF8.GetString(bytes)), b = Normalise(System.Text.Encoding.UTF8.GetString(reused[name]));
                int at = Enumerable.Range(0, Math.Min(a.Length, b.Length)).FirstOrDefault(i => a[i] != b[i]);
                Assert.True(a == b, $"{name} differs from a clean run at {at}: clean '{a[Math.Max(0, at - 80)..Math.Min(a.Length, at + 80)]}' reused '{b[Math.Max(0, at - 80)..Math.Min(b.Length, at + 80)]}'");
            }
        }
    }

    private static Dictionary<string, byte[]> OutputFiles(string folder) =>
        Directory.EnumerateFiles(folder, "*", SearchOption.AllDirectories)
            .ToDictionary(f => Path.GetRelativePath(folder, f).Replace('\\', '/'), File.ReadAllBytes, StringComparer.Ordinal);

    /// <summary>The run number and the time written are the only fields allowed to differ (JSON "run" and "time", the report's run label and its volatile spans).</summary>
    private static string Normalise(string text) => OutputNormalisation.Comparable(text);

    private static void Process(RootSession session)
    {
        var set = session.Catalog.Discover().Single();
        var outcome = new SetProcessor(session.Context).Process(set, false, CancellationToken.None);
        Assert.True(outcome.Kind == SetOutcomeKind.Done, outcome.Reason);
    }

    private static (RootSession, CountingEngine) Open(string input, string output, int featureMegabytes = 256, int workers = 2)
    {
        var options = new SeamwrightOptions();
        options.Profiles["default"] = new ProfileSettings();
        options.Service.FeatureMemoryMegabytes = featureMegabytes;
        options.Service.MaxParallelJobs = workers;
        var engine = new CountingEngine(new FeaturesEngine());
        return (RootSession.Open(options.RootFor(input, output), options, engine, new MemoryBudget(256L << 20), new SemaphoreSlim(workers), NullObserver.Instance), engine);
    }

    private static string Name(int row, int col) => $"tile_r{row + 1}_c{col + 1}.png";

    private static void WriteGrid(string folder, int cols, int rows)
    {
        Directory.CreateDirectory(folder);
        for (int r = 0; r < rows; r++)
        {
            for (int c = 0; c < cols; c++)
            {
                WriteTile(folder, r, c, noiseSeed: (ulong)(r * 10 + c));
            }
        }
    }

    /// <summary>One tile of an estate-map scene at a 170 x 130 px pitch (about 30 % overlap), rendered by the project's renderer.</summary>
    private static void WriteTile(string folder, int row, int col, ulong noiseSeed)
    {
        var scene = new ProceduralScene(4242, SceneStyle.EstateMap);
        var toScene = Transform2D.Translation(col * 170.0 + 300, row * 130.0 + 300);
        var pixels = ImageEffects.AddGaussianNoise(SceneRenderer.Render(scene, W, H, toScene, samplesPerAxis: 1), 1.5, noiseSeed);
        string path = Path.Combine(folder, Name(row, col));
        File.Delete(path);
        ImageWriter.WritePng(path, pixels);
    }

    /// <summary>The real engine, counting the pairs it estimates from corners (the second looks of undecided pairs apart).</summary>
    private sealed class CountingEngine(IPairEngine inner) : IPairEngine
    {
        private int _estimates, _secondLooks;
        private int _decodes;

        public int Estimates { get => Volatile.Read(ref _estimates); set => Volatile.Write(ref _estimates, value); }

        public int SecondLooks => Volatile.Read(ref _secondLooks);

        /// <summary>Feature-cache entries decoded (read back in full).</summary>
        public int Decodes { get => Volatile.Read(ref _decodes); set => Volatile.Write(ref _decodes, value); }

        public string Name => inner.Name;

        public string DescriptorVersion => inner.DescriptorVersion;

        public int AlgorithmVersion => inner.AlgorithmVersion;

        public ImageAnalysis Analyze(string path, FeatureSettings features, LimitSettings limits, MemoryBudget budget, CancellationToken cancel) =>
            inner.Analyze(path, features, limits, budget, cancel);

        public byte[] Encode(ImageAnalysis analysis) => inner.Encode(analysis);

        public bool HasSecondLook => inner.HasSecondLook;

        public ImageAnalysis Decode(ReadOnlySpan<byte> data)
        {
            Interlocked.Increment(ref _decodes);
            return inner.Decode(data);
        }

        public PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, EstimationSettings settings, ulong seed)
        {
            Interlocked.Increment(ref settings.ScaleSpaceLook ? ref _secondLooks : ref _estimates);
            return inner.EstimatePair(a, b, settings, seed);
        }
    }
}
