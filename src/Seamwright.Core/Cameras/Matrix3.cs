namespace Seamwright.Core.Cameras;

/// <summary>A 3x3 real matrix, row-major (rotations of the camera-rotation set model).</summary>
public readonly record struct Matrix3(
    double M11, double M12, double M13,
    double M21, double M22, double M23,
    double M31, double M32, double M33)
{
    public static Matrix3 Identity => new(1, 0, 0, 0, 1, 0, 0, 0, 1);

    public static Matrix3 operator *(in Matrix3 a, in Matrix3 b) => new(
        a.M11 * b.M11 + a.M12 * b.M21 + a.M13 * b.M31, a.M11 * b.M12 + a.M12 * b.M22 + a.M13 * b.M32, a.M11 * b.M13 + a.M12 * b.M23 + a.M13 * b.M33,
        a.M21 * b.M11 + a.M22 * b.M21 + a.M23 * b.M31, a.M21 * b.M12 + a.M22 * b.M22 + a.M23 * b.M32, a.M21 * b.M13 + a.M22 * b.M23 + a.M23 * b.M33,
        a.M31 * b.M11 + a.M32 * b.M21 + a.M33 * b.M31, a.M31 * b.M12 + a.M32 * b.M22 + a.M33 * b.M32, a.M31 * b.M13 + a.M32 * b.M23 + a.M33 * b.M33);

    public Matrix3 Transpose() => new(M11, M21, M31, M12, M22, M32, M13, M23, M33);

    public (double X, double Y, double Z) Apply(double x, double y, double z) =>
        (M11 * x + M12 * y + M13 * z, M21 * x + M22 * y + M23 * z, M31 * x + M32 * y + M33 * z);

    public (double X, double Y, double Z) Column(int j) => j switch
    {
        0 => (M11, M21, M31),
        1 => (M12, M22, M32),
        _ => (M13, M23, M33),
    };

    public double Determinant => M11 * (M22 * M33 - M23 * M32) - M12 * (M21 * M33 - M23 * M31) + M13 * (M21 * M32 - M22 * M31);

    public bool IsFinite =>
        double.IsFinite(M11) && double.IsFinite(M12) && double.IsFinite(M13) &&
        double.IsFinite(M21) && double.IsFinite(M22) && double.IsFinite(M23) &&
        double.IsFinite(M31) && double.IsFinite(M32) && double.IsFinite(M33);

    public double[] ToRowMajor() => [M11, M12, M13, M21, M22, M23, M31, M32, M33];

    public static Matrix3 FromRowMajor(ReadOnlySpan<double> m) => new(m[0], m[1], m[2], m[3], m[4], m[5], m[6], m[7], m[8]);

    /// <summary>Rotation about the unit axis of (x, y, z) by its length in radians (Rodrigues' formula).</summary>
    public static Matrix3 Exp(double x, double y, double z)
    {
        double t = Math.Sqrt(x * x + y * y + z * z);
        double a, b;
        if (t < 1e-8)
        {
            a = 1 - t * t / 6;
            b = 0.5 - t * t / 24;
        }
        else
        {
            a = Math.Sin(t) / t;
            b = (1 - Math.Cos(t)) / (t * t);
        }
        // R = I + a [w]x + b [w]x^2
        return new Matrix3(
            1 - b * (y * y + z * z), -a * z + b * x * y, a * y + b * x * z,
            a * z + b * x * y, 1 - b * (x * x + z * z), -a * x + b * y * z,
            -a * y + b * x * z, a * x + b * y * z, 1 - b * (x * x + y * y));
    }

    /// <summary>Angle in radians of the rotation (assumed orthonormal).</summary>
    public double RotationAngle()
    {
        double c = Math.Clamp((M11 + M22 + M33 - 1) / 2, -1, 1);
        // acos loses precision near 0; use the skew part for small angles.
        double sx = M32 - M23, sy = M13 - M31, sz = M21 - M12;
        double s = 0.5 * Math.Sqrt(sx * sx + sy * sy + sz * sz);
        return Math.Atan2(s, c);
    }

    /// <summary>Angle in radians between two rotations (of a^T b).</summary>
    public static double AngleBetween(in Matrix3 a, in Matrix3 b) => (a.Transpose() * b).RotationAngle();

    /// <summary>
    /// The rotation nearest to this matrix in the Frobenius norm (orthogonal Procrustes: U V^T
    /// of its singular value decomposition, with the sign fixed so the determinant is +1).
    /// </summary>
    public Matrix3 NearestRotation()
    {
        var m = MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseOfRowMajor(3, 3, ToRowMajor());
        var svd = m.Svd(true);
        var u = svd.U;
        var vt = svd.VT;
        var r = u * vt;
        if (r.Determinant() < 0)
        {
            var d = MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseIdentity(3);
            d[2, 2] = -1;
            r = u * d * vt;
        }
        return new Matrix3(r[0, 0], r[0, 1], r[0, 2], r[1, 0], r[1, 1], r[1, 2], r[2, 0], r[2, 1], r[2, 2]);
    }

    /// <summary>Rotation R = Ry(yaw) Rx(pitch) Rz(roll) as in <c>ViewTransforms.CameraRotation</c> (camera to world; radians).</summary>
    public static Matrix3 FromYawPitchRoll(double yaw, double pitch, double roll)
    {
        double cyw = Math.Cos(yaw), syw = Math.Sin(yaw);
        double cp = Math.Cos(pitch), sp = Math.Sin(pitch);
        double cr = Math.Cos(roll), sr = Math.Sin(roll);
        var ry = new Matrix3(cyw, 0, syw, 0, 1, 0, -syw, 0, cyw);
        var rx = new Matrix3(1, 0, 0, 0, cp, -sp, 0, sp, cp);
        var rz = new Matrix3(cr, -sr, 0, sr, cr, 0, 0, 0, 1);
        return ry * rx * rz;
    }
}
