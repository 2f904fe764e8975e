using Seamwright.Host.Service;
using Seamwright.Host.Supervision;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Preview;
using Seamwright.Pipeline.Quarantine;
using Seamwright.Pipeline.Settings;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Host.Tests.Supervision;

/// <summary>
/// Under the service the preview's images are opened by the real `seamwright worker` processes,
/// not in the service: the same pixels as the in-process loader, and a file that kills its worker
/// only loses its tile.
/// </summary>
public sealed class SupervisedPreviewTests : IDisposable
{
    private readonly string _folder = WorkerTestSupport.TempFolder("sw-preview-");

    public void Dispose() => Directory.Delete(_folder, true);

    private string Tile(string name, int seed)
    {
        using var image = new Image<Rgb24>(320, 240);
        var random = new Random(seed);
        image.ProcessPixelRows(rows =>
        {
            for (int y = 0; y < rows.Height; y++)
            {
                var row = rows.GetRowSpan(y);
                for (int x = 0; x < row.Length; x++)
                {
                    row[x] = new Rgb24((byte)random.Next(256), (byte)(x * 255 / 319), (byte)(y * 255 / 239));
                }
            }
        });
        string path = Path.Combine(_folder, name);
        image.SaveAsPng(path);
        return path;
    }

    [Fact]
    public async Task PreviewOpener_InWorkers_SamePixelsAsInProcessAndACrashingFileOnlyLosesItsTile()
    {
        var options = new SupervisionOptions { Workers = 1, JobTimeoutSeconds = 30, MemoryCapMegabytes = 512, StrikesBeforeQuarantine = 2 };
        await using var pool = new WorkerPool(WorkerTestSupport.Launch, options, WorkerTestSupport.Faults("crash:fatal.png"));
        var supervisor = new DecodeSupervisor(pool, new InMemoryQuarantineLedger(), options, TimeProvider.System);
        var engine = new SupervisedEngine(EngineFactory.Create("features"), supervisor, Path.Combine(_folder, "scratch"));
        string[] paths = [Tile("a.png", 1), Tile("fatal.png", 2), Tile("b.png", 3)];
        var limits = new LimitSettings();
        var budget = new MemoryBudget(256L << 20);

        var supervised = engine.PreviewOpener(paths, limits, budget);
        var local = new PreviewLoader(paths, limits, budget);

        foreach (int i in new[] { 0, 2 })
        {
            using var fromWorker = supervised(i, 200);
            using var here = local.Open(i, 200);
            Assert.NotNull(fromWorker);
            Assert.Equal((here!.Width, here.Height), (fromWorker.Width, fromWorker.Height));
            Assert.True(Same(here, fromWorker), $"{paths[i]}: worker pixels differ from the in-process loader's");
        }
        Assert.Null(supervised(1, 200));
        Assert.True(pool.Counters.Crashes >= 1, "the fault hook should have crashed a worker on fatal.png");
        using var after = supervised(0, 100);
        Assert.NotNull(after);
        Assert.Empty(Directory.GetFiles(Path.Combine(_folder, "scratch")));
    }

    private static bool Same(Image<Rgb24> a, Image<Rgb24> b)
    {
        for (int y = 0; y < a.Height; y++)
        {
            for (int x = 0; x < a.Width; x++)
            {
                if (a[x, y] != b[x, y])
                {
                    return false;
                }
            }
        }
        return true;
    }
}
