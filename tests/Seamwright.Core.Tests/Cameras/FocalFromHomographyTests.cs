using Seamwright.Core.Cameras;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;

namespace Seamwright.Core.Tests.Cameras;

/// <summary>
/// Focal length from a rotation homography (Szeliski and Shum, SIGGRAPH 1997). Worked example:
/// H = K R K^-1 built by hand for f = 800 px, a 1000 x 750 image, yaw 20 and pitch 5 degrees
/// (Hartley and Zisserman, MVG 2nd ed., section 8.4, for the form of H); both relations of the
/// paper must give 800 back.
/// </summary>
public class FocalFromHomographyTests
{
    private static readonly ImageSize Size = new(1000, 750);

    [Theory]
    [InlineData(800, 20, 5, 0)]
    [InlineData(800, 35, -10, 3)]
    [InlineData(1500, 12, 2, -1)]
    public void SourceFocal_ExactRotationHomography_GivesTheFocal(double f, double yawDeg, double pitchDeg, double rollDeg)
    {
        var bToA = ViewTransforms.CameraRotation(f, 499.5, 374.5, yawDeg * Math.PI / 180, pitchDeg * Math.PI / 180, rollDeg * Math.PI / 180);
        Assert.Equal(f, FocalFromHomography.SourceFocal(bToA, Size, Size)!.Value, 6);
        Assert.Equal(f, FocalFromHomography.DestinationFocal(bToA, Size, Size)!.Value, 6);
        Assert.Equal(f, FocalFromHomography.PairFocal(bToA, Size, Size)!.Value, 6);
    }

    [Fact]
    public void SourceFocal_DifferentFocals_EachEndItsOwn()
    {
        // H = K1 R K0^-1 with f0 = 700, f1 = 900.
        var r = Matrix3.FromYawPitchRoll(25 * Math.PI / 180, 4 * Math.PI / 180, 0);
        var k0Inv = new Transform2D(1 / 700.0, 0, -499.5 / 700, 0, 1 / 700.0, -374.5 / 700, 0, 0, 1);
        var k1 = new Transform2D(900, 0, 499.5, 0, 900, 374.5, 0, 0, 1);
        var h = k1 * new Transform2D(r.M11, r.M12, r.M13, r.M21, r.M22, r.M23, r.M31, r.M32, r.M33) * k0Inv;
        Assert.Equal(700, FocalFromHomography.SourceFocal(h, Size, Size)!.Value, 6);
        Assert.Equal(900, FocalFromHomography.DestinationFocal(h, Size, Size)!.Value, 6);
    }

    [Fact]
    public void SourceFocal_PureTranslation_None() =>
        Assert.Null(FocalFromHomography.SourceFocal(Transform2D.Translation(120, 3), Size, Size));

    [Fact]
    public void PairFocal_NoisyRigLinks_MedianWithinOnePercent()
    {
        // Homographies fitted to noisy tie points of the full-turn rig (0.3 px), as the pair stage gives them.
        var rig = RotationRig.FullTurn();
        var estimates = rig.Links(0.3, 3).Select(l => FocalFromHomography.PairFocal(l.AToB, rig.Size, rig.Size)).OfType<double>().Order().ToArray();
        Assert.True(estimates.Length >= 20);
        double median = estimates[estimates.Length / 2];
        Assert.True(Math.Abs(median / rig.Focal - 1) < 0.01, $"median {median} vs {rig.Focal}");
    }
}
