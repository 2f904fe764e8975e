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

    private (RootSession Session, ShiftEngine Engine) Open(OperationsOptions ops)
    {
        var options = new SeamwrightOptions { Engine = ChecksumEngine.EngineName };
        options.Profiles["default"] = new ProfileSettings { Pairing = new PairingSettings { Mode = PairingMode.Frames } };
        var engine = new ShiftEngine();
        Directory.CreateDirectory(Path.Combine(_folder, "in"));
        var session = RootSession.Open(options.RootFor(Path.Combine(_folder, "in"), Path.Combine(_folder, "out")), options, engine,
            new MemoryBudget(64L << 20), new SemaphoreSlim(1), NullObserver.Instance);
        session.Context.Review = new RigBaselineReview(ops, NullLogger.Instance);
        return (session, engine);
    }

    private SetInputs Frame(int n) =>
        new($"frame{n}", "default", [Image("camA", $"{n:0000}.png", n), Image("camB", $"{n:0000}.png", n + 50)], false);

    [Fact]
    public void Process_LearnedBaselineLaterPairDeviates_PairWeakWithReason()
    {
        var (session, engine) = Open(new OperationsOptions { RigLearnFromFirst = 2, RigTolerancePixels = 5 });
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
        var (session, engine) = Open(new OperationsOptions { RigBaselines = [configured], RigTolerancePixels = 5 });
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
        var bad = new OperationsOptions { RigBaselines = [new RigBaselineSetting { CameraA = "a", CameraB = "b", Transform = [1, 0, 0] }] };
        Assert.Contains(bad.Validate(), p => p.Contains("RigBaselines", StringComparison.Ordinal));
    }

    [Fact]
    public void Bind_RigBaselinesFromSettings_ReadAndValid()
    {
        var config = new ConfigurationBuilder().AddInMemoryCollection(new Dictionary<string, string?>
        {
            ["Seamwright:Operations:RigBaselines:0:CameraA"] = "left",
            ["Seamwright:Operations:RigBaselines:0:CameraB"] = "right",
            ["Seamwright:Operations:RigBaselines:0:Transform:0"] = "1",
            ["Seamwright:Operations:RigBaselines:0:Transform:1"] = "0",
            ["Seamwright:Operations:RigBaselines:0:Transform:2"] = "250.5",
            ["Seamwright:Operations:RigBaselines:0:Transform:3"] = "0",
            ["Seamwright:Operations:RigBaselines:0:Transform:4"] = "1",
            ["Seamwright:Operations:RigBaselines:0:Transform:5"] = "0",
            ["Seamwright:Operations:RigBaselines:0:Transform:6"] = "0",
            ["Seamwright:Operations:RigBaselines:0:Transform:7"] = "0",
            ["Seamwright:Operations:RigBaselines:0:Transform:8"] = "1",
        }).Build();

        var options = config.GetSection("Seamwright:Operations").Get<OperationsOptions>()!;

        var b = Assert.Single(options.RigBaselines);
        Assert.Equal(("left", "right", 250.5), (b.CameraA, b.CameraB, b.Transform[2]));
        Assert.Empty(options.Validate());
    }
}
