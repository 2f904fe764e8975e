using Microsoft.Extensions.Configuration;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Logging.Abstractions;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Host.Operations;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Host.Tests.Operations;

public sealed class RigBaselineReviewTests : IDisposable
{
    private readonly string _folder = Directory.CreateTempSubdirectory("sw-rig-").FullName;

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        Directory.Delete(_folder, true);
    }

    /// <summary>The checksum engine with a chosen A-to-B translation instead of the identity.</summary>
    private sealed class ShiftEngine : IPairEngine
    {
        private readonly ChecksumEngine _inner = new();

        public double Shift { get; set; }

        public string Name => _inner.Name;

        public string DescriptorVersion => _inner.DescriptorVersion;

        public int AlgorithmVersion => _inner.AlgorithmVersion;

        public ImageAnalysis Analyze(string path, FeatureSettings features, LimitSettings limits, MemoryBudget budget, CancellationToken cancel) =>
            _inner.Analyze(path, features, limits, budget, cancel);

        public byte[] Encode(ImageAnalysis analysis) => _inner.Encode(analysis);

        public bool HasSecondLook => ((IPairEngine)_inner).HasSecondLook;

        public ImageAnalysis Decode(ReadOnlySpan<byte> data) => _inner.Decode(data);

        public PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, EstimationSettings settings, ulong seed)
        {
            var p = _inner.EstimatePair(a, b, settings, seed);
            return p with { Estimate = p.Estimate with { Transform = Transform2D.Translation(100 + Shift, 0), Reasons = [] } };
        }
    }

    private InputFile Image(string camera, string name, int seed)
    {
        string path = Path.Combine(_folder, "in", camera, name);
        Directory.CreateDirectory(Path.GetDirectoryName(path)!);
        using var img = new Image<L8>(64, 48);
        for (int y = 0; y < 48; y++)
        {
            for (int x = 0; x < 64; x++)
            {
                img[x, y] = new L8((byte)((x * 7) + (y * 13) + seed));
            }
        }
        img.SaveAsPng(path);
        var info = new FileInfo(path);
        return new InputFile(path, Path.Combine(_folder, "in"), camera + "/" + name, info.Length, info.LastWriteTimeUtc.Ticks);
    }

    private (RootSession Session, ShiftEngine Engine) Open(Action<ProfileSettings> rig)
    {
        var options = new SeamwrightOptions { Engine = ChecksumEngine.EngineName };
        var profile = new ProfileSettings { Pairing = new PairingSettings { Mode = PairingMode.Frames } };
        rig(profile);
        options.Profiles["default"] = profile;
        var engine = new ShiftEngine();
        Directory.CreateDirectory(Path.Combine(_folder, "in"));
        var session = RootSession.Open(options.RootFor(Path.Combine(_folder, "in"), Path.Combine(_folder, "out")), options, engine,
            new MemoryBudget(64L << 20), new SemaphoreSlim(1), NullObserver.Instance);
        session.Context.Review = new RigBaselineReview(NullLogger.Instance);
        return (session, engine);
    }

    private SetInputs Frame(int n) =>
        new($"frame{n}", "default", [Image("camA", $"{n:0000}.png", n), Image("camB", $"{n:0000}.png", n + 50)], false);

    [Fact]
    public void Process_LearnedBaselineLaterPairDeviates_PairWeakWithReason()
    {
        var (session, engine) = Open(p => (p.RigLearnFromFirst, p.RigTolerancePx) = (2, 5));
        using var _ = session;
        var processor = new SetProcessor(session.Context);
        var kinds = new List<SetOutcomeKind>();
        foreach (var (n, shift) in new[] { (1, 0.0), (2, 1.0), (3, 2.0), (4, 40.0) })
        {
            engine.Shift = shift;
            kinds.Add(processor.Process(Frame(n), false, CancellationToken.None).Kind);
        }

        Assert.All(kinds, k => Assert.Equal(SetOutcomeKind.Done, k));
        var records = ConfidenceLog.ReadAll(session.Context.Log.Path).Where(r => r.Kind == "pair").ToList();
        Assert.Equal(4, records.Count);
        // Frames 1 and 2 set the baseline, frame 3 is within 5 px of it, frame 4 is 39+ px off.
        Assert.Equal(new[] { "accepted", "accepted", "accepted", "weak" }, records.OrderBy(r => r.Set, StringComparer.Ordinal).Select(r => r.Status));
        var weak = records.Single(r => r.Set == "frame4");
        Assert.Contains(weak.Reasons, r => r.StartsWith("rig baseline camA->camB", StringComparison.Ordinal));
        var row = session.Context.Store.PairResults(session.Context.Store.GetSet("frame4")!.DoneRun!.Value).Single();
        Assert.Equal("weak", row.Status);
        Assert.Equal(1, session.Context.Store.Runs("frame4").Single().Summary!.Weak);
    }

    [Fact]
    public void Process_ConfiguredBaseline_FirstDeviatingPairWeak()
    {
        var configured = new RigBaselineSetting { CameraA = "camA", CameraB = "camB", Transform = [1, 0, 100, 0, 1, 0, 0, 0, 1] };
        var (session, engine) = Open(p => (p.RigBaselines, p.RigTolerancePx) = ([configured], 5));
        using var _ = session;
        var processor = new SetProcessor(session.Context);
        engine.Shift = 3;
        processor.Process(Frame(1), false, CancellationToken.None);
        engine.Shift = -20;
        processor.Process(Frame(2), false, CancellationToken.None);

        var records = ConfidenceLog.ReadAll(session.Context.Log.Path).Where(r => r.Kind == "pair").OrderBy(r => r.Set, StringComparer.Ordinal).ToList();
        Assert.Equal(new[] { "accepted", "weak" }, records.Select(r => r.Status));
        Assert.Contains(records[1].Reasons, r => r.Contains("20.0 px from the baseline", StringComparison.Ordinal));
    }

    [Fact]
    public void Validate_BadConfiguredBaseline_Refused()
    {
        var options = new SeamwrightOptions();
        options.Profiles["default"] = new ProfileSettings { RigBaselines = [new RigBaselineSetting { CameraA = "a", CameraB = "b", Transform = [1, 0, 0] }] };
        var problems = Seamwright.Host.Configuration.SettingsValidator.Check(options);
        Assert.Contains(problems, p => p.Contains("Profiles:default:RigBaselines:0", StringComparison.Ordinal));
    }

    [Fact]
    public void Bind_RigBaselinesFromProfile_ReadAndFingerprinted()
    {
        var config = new ConfigurationBuilder().AddInMemoryCollection(new Dictionary<string, string?>
        {
            ["Pairing:Mode"] = "Frames",
            ["RigTolerancePx"] = "4",
            ["RigBaselines:0:CameraA"] = "left",
            ["RigBaselines:0:CameraB"] = "right",
            ["RigBaselines:0:Transform:0"] = "1",
            ["RigBaselines:0:Transform:1"] = "0",
            ["RigBaselines:0:Transform:2"] = "250.5",
            ["RigBaselines:0:Transform:3"] = "0",
            ["RigBaselines:0:Transform:4"] = "1",
            ["RigBaselines:0:Transform:5"] = "0",
            ["RigBaselines:0:Transform:6"] = "0",
            ["RigBaselines:0:Transform:7"] = "0",
            ["RigBaselines:0:Transform:8"] = "1",
        }).Build();

        var profile = config.Get<ProfileSettings>()!;

        var b = Assert.Single(profile.RigBaselines);
        Assert.Equal(("left", "right", 250.5, 4.0), (b.CameraA, b.CameraB, b.Transform[2], profile.RigTolerancePx));
        string before = SettingsFingerprint.ForSet(profile, new LimitSettings(), "checksum", 1);
        b.Transform[2] = 251;
        Assert.NotEqual(before, SettingsFingerprint.ForSet(profile, new LimitSettings(), "checksum", 1));
        // Rig settings do not shape other pairings, so they leave those fingerprints alone.
        var sequence = new ProfileSettings { Pairing = new PairingSettings { Mode = PairingMode.Sequence } };
        string seq = SettingsFingerprint.ForSet(sequence, new LimitSettings(), "checksum", 1);
        sequence.RigTolerancePx = 1;
        Assert.Equal(seq, SettingsFingerprint.ForSet(sequence, new LimitSettings(), "checksum", 1));
    }
}
