using Seamwright.Core.Cameras;

namespace Seamwright.Core.Tests.Cameras;

public class MatrixAndLevellingTests
{
    [Fact]
    public void Exp_AboutY_IsTheYawRotation()
    {
        var a = Matrix3.Exp(0, 0.3, 0);
        var b = Matrix3.FromYawPitchRoll(0.3, 0, 0);
        Assert.True(Matrix3.AngleBetween(a, b) < 1e-12);
        Assert.Equal(0.3, a.RotationAngle(), 12);
    }

    [Fact]
    public void NearestRotation_OfPerturbedRotation_IsOrthonormal()
    {
        var r = Matrix3.FromYawPitchRoll(0.4, -0.2, 0.1);
        var m = new Matrix3(r.M11 + 0.01, r.M12, r.M13, r.M21, r.M22 - 0.01, r.M23, r.M31, r.M32, r.M33 + 0.005);
        var q = m.NearestRotation();
        Assert.Equal(1, q.Determinant, 10);
        Assert.True(Matrix3.AngleBetween(q, r) < 0.02);
    }

    [Fact]
    public void Find_PanTiltedAsAWhole_LevelsTheXAxes()
    {
        // A pan of six frames whose whole world is tilted by 12 degrees about the z axis and 5 about x.
        var tilt = Matrix3.FromYawPitchRoll(0, 5 * Math.PI / 180, 12 * Math.PI / 180);
        var rotations = Enumerable.Range(0, 6).Select(k => tilt * Matrix3.FromYawPitchRoll(k * 0.5, 0.1, 0)).ToArray();
        var (g, angle) = Levelling.Find(rotations);
        Assert.True(angle > 0.1);
        foreach (var r in rotations)
        {
            Assert.True(Math.Abs((g * r).M21) < 1e-9, $"x axis y component {(g * r).M21}");
        }
    }
}
