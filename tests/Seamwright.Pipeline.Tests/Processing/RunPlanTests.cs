using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Settings;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Processing;

/// <summary>A run reads the settings once, when it begins; a reload reaches only the runs that begin after it.</summary>
public class RunPlanTests
{
    private static readonly TimeSpan Limit = TimeSpan.FromMinutes(2);

    [Fact]
    public async Task Process_SettingsReplacedWhileSetRuns_RunKeepsOldValuesAndFingerprintNextRunUsesNew()
    {
        using var dir = new ScratchFolder();
        TestImages.WriteSet(dir.Sub("in/s"), 4, 1);
        var old = Sessions.Options(p => p.Estimation.Seed = 111);
        var gate = new GateEngine();
        using var session = RootSession.Open(old.RootFor(dir.Sub("in"), dir.Sub("out")), old, gate, new MemoryBudget(256L << 20),
            new SemaphoreSlim(2), NullObserver.Instance);
        var set = session.Catalog.Discover().Single();
        string oldFp = session.Context.FingerprintFor("default");
        var running = Task.Run(() => new SetProcessor(session.Context).Process(set, false, CancellationToken.None));
        Assert.True(gate.Entered.Wait(Limit), "the run never reached the image stage");

        // What a settings reload does (WatchCommand.Reload): the context's options replaced whole,
        // with a new seed and a pixel limit every test image (64 x 48) is above.
        var fresh = Sessions.Options(p => p.Estimation.Seed = 222);
        fresh.Limits.MaxMegapixels = 0.0001;
        session.Context.Options = fresh;
        string newFp = session.Context.FingerprintFor("default");
        gate.Open.Set();
        var first = await running.WaitAsync(Limit);

        Assert.NotEqual(oldFp, newFp);
        Assert.Equal(SetOutcomeKind.Done, first.Kind);
        Assert.Equal(0, first.Summary!.BadFiles); // every decode of the run used the old limit
        AssertRunMadeWith(dir.Sub("out"), first.RunId!.Value, oldFp, 111);
        Assert.Equal(oldFp, session.Context.Store.GetRun(first.RunId.Value)!.Fingerprint);

        var second = new SetProcessor(session.Context).Process(set, false, CancellationToken.None);

        Assert.Equal(SetOutcomeKind.Done, second.Kind);
        AssertRunMadeWith(dir.Sub("out"), second.RunId!.Value, newFp, 222);
    }

    [Fact]
    public void Resolve_LiveOptionsEditedAfterwards_PlanUnchanged()
    {
        var options = Sessions.Options(p => p.Estimation.ThresholdPx = 2.5);
        var plan = RunPlan.Resolve(options, "default", "checksum", 1001);

        options.Profile("default").Estimation.ThresholdPx = 9;
        options.Limits.MaxMegapixels = 1;

        Assert.Equal(2.5, plan.Profile.Estimation.ThresholdPx);
        Assert.Equal(new LimitSettings().MaxMegapixels, plan.Limits.MaxMegapixels);
        Assert.Equal(SettingsFingerprint.ForSet(plan.Profile, plan.Limits, "checksum", 1001), plan.Fingerprint);
        Assert.NotEqual(SettingsFingerprint.ForSet(options.Profile("default"), options.Limits, "checksum", 1001), plan.Fingerprint);
    }

    private static void AssertRunMadeWith(string outRoot, long run, string fingerprint, ulong seed)
    {
        string setOut = Path.Combine(outRoot, "s");
        var manifest = OutputJson.ReadManifest(Path.Combine(setOut, OutputLayout.ManifestName));
        Assert.Equal((run, fingerprint), (manifest.Run, manifest.SettingsFingerprint));
        Assert.Equal(4, manifest.Images.Length);
        foreach (string image in manifest.Images)
        {
            var sidecar = OutputJson.ReadSidecar(Path.Combine(setOut, OutputLayout.SidecarRelative(image)));
            Assert.Equal((run, fingerprint, seed.ToString(System.Globalization.CultureInfo.InvariantCulture)), (sidecar.Run, sidecar.SettingsFingerprint, sidecar.BaseSeed));
        }
        var records = ConfidenceLog.ReadAll(Path.Combine(outRoot, ConfidenceLog.FileName)).Where(r => r.Run == run).ToList();
        Assert.NotEmpty(records);
        Assert.All(records, r => Assert.Equal(fingerprint, r.SettingsFingerprint));
        Assert.All(records, r => Assert.Equal(PairSeed.Derive(seed, r.ImageA, r.ImageB!).ToString(System.Globalization.CultureInfo.InvariantCulture), r.Seed));
    }

    /// <summary>The checksum engine, holding every image analysis until <see cref="Open"/> is set.</summary>
    private sealed class GateEngine : IPairEngine
    {
        private readonly ChecksumEngine _inner = new();

        public ManualResetEventSlim Entered { get; } = new();

        public ManualResetEventSlim Open { get; } = new();

        public string Name => _inner.Name;

        public string DescriptorVersion => _inner.DescriptorVersion;

        public int AlgorithmVersion => _inner.AlgorithmVersion;

        public ImageAnalysis Analyze(string path, FeatureSettings features, LimitSettings limits, MemoryBudget budget, CancellationToken cancel)
        {
            Entered.Set();
            Open.Wait(cancel);
            return _inner.Analyze(path, features, limits, budget, cancel);
        }

        public byte[] Encode(ImageAnalysis analysis) => _inner.Encode(analysis);

        public bool HasSecondLook => ((IPairEngine)_inner).HasSecondLook;

        public ImageAnalysis Decode(ReadOnlySpan<byte> data) => _inner.Decode(data);

        public PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, EstimationSettings settings, ulong seed) =>
            _inner.EstimatePair(a, b, settings, seed);
    }
}
