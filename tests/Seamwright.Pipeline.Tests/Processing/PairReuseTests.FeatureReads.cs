using Seamwright.Pipeline.Processing;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Processing;

public sealed partial class PairReuseTests
{
    /// <summary>
    /// Two workers on a wide grid, with a feature memory that holds the images of about two rows (what
    /// a row of right and lower neighbours needs until its images come back): taking the pairs in plan order, the workers share the images in use and each image is
    /// read from the feature cache about once. Workers started in separate parts of the plan need
    /// twice the images at once and read them again and again.
    /// </summary>
    [Fact]
    public void Pairs_WideGridTwoWorkersBudgetForTwoRows_ReadEachImageAboutOnce()
    {
        const int cols = 12, rows = 3;
        using var dir = new ScratchFolder();
        WriteGrid(dir.Sub("in/g"), cols, rows);
        var (first, _) = Open(dir.Sub("in"), dir.Sub("out"));
        using (first)
        {
            Process(first);
        }
        var entries = Directory.GetFiles(dir.Sub("out/.seamwright/features"), "*.bin", SearchOption.AllDirectories);
        Assert.Equal(cols * rows, entries.Length);
        double entryMb = entries.Max(e => new FileInfo(e).Length) / 1048576.0;
        int budgetMb = (int)Math.Ceiling(entryMb * (2 * cols + 4));
        // Another base seed: every pair is estimated again, its features read from the feature cache.
        var reads = new ReadCounter();
        var (again, engine) = Open(dir.Sub("in"), dir.Sub("out"), featureMegabytes: budgetMb, workers: 2, seed: 7, observer: reads);
        using (again)
        {
            Process(again);
        }
        Assert.Equal((cols - 1) * rows + cols * (rows - 1), engine.Estimates);
        // The corner pass (a second look at undecided pairs reads its own images afterwards). Two
        // workers missing the same image at once may both read it: a few reads above one per image.
        Assert.InRange(reads.First ?? -1, cols * rows, cols * rows + 4);
    }

    private sealed class ReadCounter : IProcessingObserver
    {
        public int? First { get; private set; }

        public void FeaturesRead(string setId, int reads, int images) => First ??= reads;

        public void SetStarted(string setId, long runId, int images) { }

        public void ImageDone(string setId, string image, bool fromCache) { }

        public void BadFile(string setId, string image, string reason) { }

        public void PairsPlanned(string setId, int pairs) { }

        public void PairDone(string setId, string imageA, string imageB, Seamwright.Core.Estimation.PairStatus status, IReadOnlyList<string> reasons) { }

        public void SetFinished(SetOutcome outcome) { }
    }
}
