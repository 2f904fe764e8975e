using System.Diagnostics;
using Seamwright.Core.Synthetic;
using Seamwright.Pipeline.Output;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Integration;

/// <summary>
/// Issue 10's rotating-camera shoots on rendered images through the real `run`: the truth source
/// is our own renderer (<c>Core/Synthetic/SphericalView</c>, the shoots in
/// <c>Core/Synthetic/RotationShoot</c>: rotation per frame, focal length, k1 applied in the render).
/// The four sets are rendered once per test run at <see cref="Width"/> x <see cref="Height"/> and
/// run together with default settings; each test scores one set from its sidecars and manifest.
/// The full sizes are the `shoots` benchmark (tests/Seamwright.Benchmarks/Scale/ShootsBenchmark.cs).
/// </summary>
public sealed class RotationShootTests(RotationShootTests.Run run, ITestOutputHelper output) : IClassFixture<RotationShootTests.Run>
{
    public const int Width = 480;
    public const int Height = 360;

    [Fact]
    public void FullTurn_FifteenFrames_AllPlacedWithinTheRotationAndFocalTargets() => AssertTargets(RotationShoot.FullTurn(Width, Height));

    [Fact]
    public void TwoRows_TwentyFourFrames_AllPlacedWithinTheRotationAndFocalTargets() => AssertTargets(RotationShoot.TwoRows(Width, Height));

    [Fact]
    public void BarrelPan_150Degrees_K1WithinOneHundredth()
    {
        var score = Score(RotationShoot.BarrelPan(Width, Height));
        Assert.Equal(score.Frames, score.Placed);
        Assert.True(score.K1Error <= 0.01, score.ToString());
    }

    [Fact]
    public void Zenith_RowsAndAFrameLookingUp_EveryFramePlaced()
    {
        var score = Score(RotationShoot.Zenith(Width, Height));
        Assert.Equal(score.Frames, score.Placed);
        Assert.True(score.WorstDeg <= 0.1, score.ToString());
    }

    private void AssertTargets(RotationShoot shoot)
    {
        var score = Score(shoot);
        Assert.Equal("rotation", score.SetModel);
        Assert.True(score.Placed == score.Frames, score.ToString());
        Assert.True(score.MedianDeg <= 0.02, score.ToString());
        Assert.True(score.WorstDeg <= 0.1, score.ToString());
        Assert.True(score.FocalError <= 0.003, score.ToString());
    }

    private RotationShootScore Score(RotationShoot shoot)
    {
        output.WriteLine(run.Summary);
        Assert.True(run.ExitCode == 0, run.Summary);
        var score = RotationShootScore.Read(shoot, Path.Combine(run.Output, shoot.Name));
        output.WriteLine(score.ToString());
        return score;
    }

    /// <summary>The four shoots rendered and run once for the class.</summary>
    public sealed class Run : IDisposable
    {
        private readonly ScratchFolder _dir = new();

        public Run()
        {
            var clock = Stopwatch.StartNew();
            string input = _dir.Sub("input");
            foreach (var shoot in RotationShoot.All(Width, Height))
            {
                string set = Path.Combine(input, shoot.Name);
                Directory.CreateDirectory(set);
                Parallel.For(0, shoot.Count, i => ImageWriter.Write(Path.Combine(set, shoot.FileName(i)), shoot.Render(i, samplesPerAxis: 1), 90));
            }
            double rendered = clock.Elapsed.TotalSeconds;
            Output = _dir.Sub("out");
            var (code, stdout, stderr) = SeamwrightProcess.Run(_dir.Path, TimeSpan.FromMinutes(15), "run", input, "--output", Output);
            ExitCode = code;
            Summary = $"rendered in {rendered:0.0} s, run exit {code} after {clock.Elapsed.TotalSeconds - rendered:0.0} s\n{stdout}{stderr}";
        }

        public string Output { get; }

        public int ExitCode { get; }

        public string Summary { get; }

        public void Dispose() => _dir.Dispose();
    }
}
