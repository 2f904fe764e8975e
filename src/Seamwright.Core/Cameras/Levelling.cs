namespace Seamwright.Core.Cameras;

/// <summary>
/// Straightening of a rotation set (Brown and Lowe, IJCV 2007, section 5.1): people rarely roll
/// the camera against the horizon, so the cameras' x axes lie near one plane; its normal, the
/// eigenvector of the smallest eigenvalue of sum x_i x_i^T, is the world's up. The world is then
/// turned so that up is -y (y points down in every camera frame). When the x axes do not span a
/// plane (all cameras nearly alike), up is taken as the mean of the cameras' up vectors made
/// perpendicular to the common x axis.
/// </summary>
public static class Levelling
{
    /// <summary>The world rotation G to apply (R_i becomes G R_i) and the angle it turns, radians.</summary>
    public static (Matrix3 G, double Angle) Find(IReadOnlyList<Matrix3> rotations)
    {
        ArgumentNullException.ThrowIfNull(rotations);
        if (rotations.Count == 0)
        {
            return (Matrix3.Identity, 0);
        }
        var s = new double[3, 3];
        double ux = 0, uy = 0, uz = 0;
        foreach (var r in rotations)
        {
            var (x0, x1, x2) = r.Column(0);
            double[] x = [x0, x1, x2];
            for (int i = 0; i < 3; i++)
            {
                for (int j = 0; j < 3; j++)
                {
                    s[i, j] += x[i] * x[j];
                }
            }
            var (y0, y1, y2) = r.Column(1);
            ux -= y0;
            uy -= y1;
            uz -= y2;
        }
        var evd = MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseOfArray(s).Evd(MathNet.Numerics.LinearAlgebra.Symmetricity.Symmetric);
        var values = evd.EigenValues.Select(v => v.Real).ToArray();
        var vectors = evd.EigenVectors;
        var order = Enumerable.Range(0, 3).OrderBy(i => values[i]).ToArray();
        double upX, upY, upZ;
        if (values[order[1]] > 0.01 * values[order[2]])
        {
            upX = vectors[0, order[0]];
            upY = vectors[1, order[0]];
            upZ = vectors[2, order[0]];
        }
        else
        {
            // x axes nearly parallel: keep the mean up, made perpendicular to them.
            double ex = vectors[0, order[2]], ey = vectors[1, order[2]], ez = vectors[2, order[2]];
            double d = ux * ex + uy * ey + uz * ez;
            (upX, upY, upZ) = (ux - d * ex, uy - d * ey, uz - d * ez);
        }
        double n = Math.Sqrt(upX * upX + upY * upY + upZ * upZ);
        if (!(n > 1e-12))
        {
            return (Matrix3.Identity, 0);
        }
        (upX, upY, upZ) = (upX / n, upY / n, upZ / n);
        if (upX * ux + upY * uy + upZ * uz < 0)
        {
            (upX, upY, upZ) = (-upX, -upY, -upZ);
        }
        // Rotation taking up to (0, -1, 0) about their common perpendicular (smallest such turn).
        double tx = 0, ty = -1, tz = 0;
        double ax = upY * tz - upZ * ty, ay = upZ * tx - upX * tz, az = upX * ty - upY * tx;
        double sin = Math.Sqrt(ax * ax + ay * ay + az * az);
        double cos = upX * tx + upY * ty + upZ * tz;
        double angle = Math.Atan2(sin, cos);
        if (sin < 1e-15)
        {
            return cos > 0 ? (Matrix3.Identity, 0) : (new Matrix3(1, 0, 0, 0, -1, 0, 0, 0, -1), Math.PI);
        }
        return (Matrix3.Exp(ax / sin * angle, ay / sin * angle, az / sin * angle), angle);
    }
}
