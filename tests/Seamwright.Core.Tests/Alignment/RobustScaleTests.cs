using Seamwright.Core.Alignment;
using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Xunit.Abstractions;

namespace Seamwright.Core.Tests.Alignment;

/// <summary>
/// The joint refinement's second pass (<see cref="JointRefiner"/>): its Cauchy scale is matched to
/// the tie points' noise (4 sigma; sigma from the median residual
/// distance), never below <see cref="AlignmentOptions.MinRobustScalePx"/> nor above
/// <see cref="AlignmentOptions.RobustScalePx"/>; and on a chain whose tie points carry a few
/// re-localisation slips it places the far frames closer to the truth than the fixed 2 px scale.
/// </summary>
public sealed class RobustScaleTests(ITestOutputHelper output)
{
    private static readonly ImageSize Size = new(640, 480);

    /// <summary>
    /// Two frames, B shifted 440 px along x and turned 0.5 degrees; tie points on a grid over the
    /// overlap, Gaussian noise of sigma px per coordinate on B's side only (A's side is an exact
    /// anchor pixel, as the re-localisation gives), every slipEvery-th point off by slipPx.
    /// </summary>
    private static (Transform2D BToA, Correspondence[] Ties) Pair(double sigma, ulong seed, int slipEvery = 0, double slipPx = 0)
    {
        var noise = new TestNoise(seed);
        var bToA = SyntheticSet.Place(440, 3, 0.5, 1.002);
        var aToB = bToA.Inverse();
        var ties = new List<Correspondence>();
        for (int y = 8; y < Size.Height - 8; y += 12)
        {
            for (int x = 448; x < Size.Width - 8; x += 12)
            {
                var (u, v) = aToB.Apply(x, y);
                if (u < 2 || v < 2 || u > Size.Width - 3 || v > Size.Height - 3)
                {
                    continue;
                }
                double du = noise.Gaussian(sigma), dv = noise.Gaussian(sigma);
                if (slipEvery > 0 && ties.Count % slipEvery == slipEvery - 1)
                {
                    du += slipPx;
                }
                ties.Add(new Correspondence(x, y, u + du, v + dv));
            }
        }
        return (bToA, [.. ties]);
    }

    private static JointSolution Refine(Correspondence[] ties, Transform2D start, bool adapt, double robustPx = 2, double minPx = 0.05) =>
        new JointRefiner(MotionModel.Similarity, [Size, Size], 0, [0, 1], [(0, 1, ties)], robustPx, minPx)
            .Solve(new Dictionary<int, Transform2D> { [0] = Transform2D.Identity, [1] = start }, 60, adapt);

    [Theory]
    [InlineData(0.04)]
    [InlineData(0.1)]
    [InlineData(0.3)]
    public void Solve_Adapting_ScaleFollowsTheTiePointNoise(double sigma)
    {
        var (truth, ties) = Pair(sigma, 17);
        var solution = Refine(ties, truth, adapt: true);
        // Residual distances are Rayleigh with sigma per coordinate: median sigma sqrt(2 ln 2).
        double expected = 4 * sigma;
        output.WriteLine($"sigma {sigma} px, {ties.Length} tie points: matched scale {solution.RobustScalePx:0.0000} px (expected about {expected:0.0000})");
        Assert.InRange(solution.RobustScalePx, 0.85 * expected, 1.15 * expected);
    }

    [Fact]
    public void Solve_FixedScale_KeepsTheConfiguredScale()
    {
        var (truth, ties) = Pair(0.05, 18);
        Assert.Equal(2, Refine(ties, truth, adapt: false).RobustScalePx);
        Assert.Equal(1.5, Refine(ties, truth, adapt: false, robustPx: 1.5).RobustScalePx);
    }

    [Fact]
    public void Solve_NearlyExactTiePoints_StopsAtTheFloor()
    {
        var (truth, ties) = Pair(0.001, 19); // matched scale would be 0.004 px
        Assert.Equal(0.05, Refine(ties, truth, adapt: true).RobustScalePx, 12);
        Assert.Equal(0.2, Refine(ties, truth, adapt: true, minPx: 0.2).RobustScalePx, 12);
    }

    [Fact]
    public void Solve_NoisierThanTheCap_KeepsTheCapAndTheFirstPass()
    {
        var (truth, ties) = Pair(2.0, 20); // matched scale would be about 8 px, above the 2 px cap
        var adapted = Refine(ties, truth, adapt: true);
        var fixedScale = Refine(ties, truth, adapt: false);
        Assert.Equal(2, adapted.RobustScalePx);
        Assert.Equal(fixedScale.ToReference[1], adapted.ToReference[1]);
        Assert.Equal(fixedScale.Iterations, adapted.Iterations);
    }

    [Fact]
    public void Solve_FloorAboveTheCap_UsesTheCap()
    {
        var (truth, ties) = Pair(0.05, 21);
        Assert.Equal(0.5, Refine(ties, truth, adapt: true, robustPx: 0.5, minPx: 1).RobustScalePx);
    }

    /// <summary>
    /// 41 frames in a row, similarity truth, tie points with 0.04 px noise and one point in 20 slipped
    /// by 0.8 px in a random direction (a re-localisation onto the neighbouring texture): with the fixed
    /// 2 px scale the slips keep most of their pull and the error walks into the far frames.
    /// </summary>
    [Fact]
    public void Align_ChainWithSlippedTiePoints_AdaptedScaleBeatsTheFixedScale()
    {
        const int n = 41;
        var toWorld = new Transform2D[n];
        var jitter = new TestNoise(5);
        for (int i = 0; i < n; i++)
        {
            toWorld[i] = SyntheticSet.Place(448 * i + 4 * jitter.Gaussian(1), 4 * jitter.Gaussian(1), 0.5 * jitter.Gaussian(1), 1 + 0.005 * jitter.Gaussian(1));
        }
        var noise = new TestNoise(6);
        var links = new List<AlignmentLink>();
        for (int i = 0; i + 1 < n; i++)
        {
            var aToB = toWorld[i + 1].Inverse() * toWorld[i];
            var ties = new List<Correspondence>();
            for (int y = 8; y < Size.Height - 8; y += 10)
            {
                for (int x = 440; x < Size.Width - 8; x += 10)
                {
                    var (u, v) = aToB.Apply(x, y);
                    if (u < 2 || v < 2 || u > Size.Width - 3 || v > Size.Height - 3)
                    {
                        continue;
                    }
                    double du = noise.Gaussian(0.04), dv = noise.Gaussian(0.04);
                    if (ties.Count % 20 == 19)
                    {
                        double angle = 2 * Math.PI * noise.Uniform();
                        du += 0.8 * Math.Cos(angle);
                        dv += 0.8 * Math.Sin(angle);
                    }
                    ties.Add(new Correspondence(x, y, u + du, v + dv));
                }
            }
            links.Add(new AlignmentLink(i, i + 1, aToB, [.. ties], PairStatus.Accepted, ties.Count));
        }
        var set = new SyntheticSet(Size, toWorld, 1);
        var sizes = Enumerable.Repeat(Size, n).ToArray();
        var adapted = SetAligner.Align(sizes, links, MotionModel.Similarity);
        var fixedScale = SetAligner.Align(sizes, links, MotionModel.Similarity, new AlignmentOptions { AdaptRobustScale = false });
        Assert.Equal(n, adapted.PlacedCount);
        var (am, ax) = set.CornerError(adapted, i => adapted.Images[i].ToReference);
        var (fm, fx) = set.CornerError(fixedScale, i => fixedScale.Images[i].ToReference);
        output.WriteLine($"corner error vs truth: adapted scale mean {am:0.000} px, max {ax:0.000} px; fixed 2 px scale mean {fm:0.000} px, max {fx:0.000} px");
        Assert.True(am < 0.75 * fm, $"adapted mean {am} px, fixed {fm} px");
        Assert.True(ax < fx, $"adapted max {ax} px, fixed {fx} px");
    }
}
