using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>
/// Focal length from the homography between two views of a camera rotating about its centre
/// (Szeliski and Shum, "Creating full view panoramic image mosaics and environment maps",
/// SIGGRAPH 1997; used by Brown and Lowe, IJCV 2007, to start their bundle adjustment). With the
/// principal points at the image centres, H = K1 R K0^-1, K = diag(f, f, 1), so H K0^2 H^T is
/// proportional to K1^2: its (1, 2) entry is zero and its (1, 1) and (2, 2) entries are equal.
/// Each gives f0^2 in closed form; the better conditioned of the two is used.
/// </summary>
public static class FocalFromHomography
{
    /// <summary>
    /// Focal length in pixels of the source image of <paramref name="aToB"/> (pixels of A to pixels
    /// of B); null when neither relation gives a positive square (near-pure translation, noise).
    /// </summary>
    public static double? SourceFocal(in Transform2D aToB, ImageSize a, ImageSize b)
    {
        var h = Centred(aToB, a, b);
        double h0 = h.M11, h1 = h.M12, h2 = h.M13, h3 = h.M21, h4 = h.M22, h5 = h.M23;
        // (H D H^T)_12 = 0: f^2 (h0 h3 + h1 h4) + h2 h5 = 0
        double d1 = h0 * h3 + h1 * h4;
        double v1 = -h2 * h5 / d1;
        // (H D H^T)_11 = (H D H^T)_22: f^2 (h0^2 + h1^2 - h3^2 - h4^2) = h5^2 - h2^2
        double d2 = h0 * h0 + h1 * h1 - h3 * h3 - h4 * h4;
        double v2 = (h5 * h5 - h2 * h2) / d2;
        bool ok1 = double.IsFinite(v1) && v1 > 0, ok2 = double.IsFinite(v2) && v2 > 0;
        if (ok1 && ok2)
        {
            return Math.Sqrt(Math.Abs(d1) > Math.Abs(d2) ? v1 : v2);
        }
        if (ok1)
        {
            return Math.Sqrt(v1);
        }
        if (ok2)
        {
            return Math.Sqrt(v2);
        }
        return null;
    }

    /// <summary>Focal length of the destination image: the source focal of the inverse.</summary>
    public static double? DestinationFocal(in Transform2D aToB, ImageSize a, ImageSize b) =>
        aToB.TryInvert(out var bToA) ? SourceFocal(bToA, b, a) : null;

    /// <summary>The geometric mean of both ends' focal lengths (Brown and Lowe 2007), or the one that exists.</summary>
    public static double? PairFocal(in Transform2D aToB, ImageSize a, ImageSize b)
    {
        double? fa = SourceFocal(aToB, a, b), fb = DestinationFocal(aToB, a, b);
        return fa is double x && fb is double y ? Math.Sqrt(x * y) : fa ?? fb;
    }

    /// <summary>The homography in coordinates centred on each image's centre, scaled to unit Frobenius norm.</summary>
    private static Transform2D Centred(in Transform2D aToB, ImageSize a, ImageSize b)
    {
        double ax = (a.Width - 1) / 2.0, ay = (a.Height - 1) / 2.0, bx = (b.Width - 1) / 2.0, by = (b.Height - 1) / 2.0;
        var h = Transform2D.Translation(-bx, -by) * aToB * Transform2D.Translation(ax, ay);
        double n = Math.Sqrt(h.ToRowMajor().Sum(v => v * v));
        return n > 0 ? h.Scale(1 / n) : h;
    }
}
