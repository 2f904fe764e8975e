namespace Seamwright.Core.Cameras;

/// <summary>Projections a rotation set can be stitched in.</summary>
public enum StitchProjection
{
    /// <summary>Straight lines stay straight; for narrow sets (up to about 120 degrees).</summary>
    Rectilinear,

    /// <summary>Longitude across, tangent of latitude up; for wide single-row sets.</summary>
    Cylindrical,

    /// <summary>Longitude across, latitude up; for full turns and sets reaching towards a pole.</summary>
    Equirectangular,
}

/// <summary>
/// What a levelled rotation set covers: horizontal extent (360 less the largest uncovered gap of
/// longitude), vertical extent (latitudes of the image borders), and the suggested projection with
/// its canvas at the set's resolution (one pixel per 1/f radian at the centre).
/// </summary>
/// <param name="HorizontalDeg">Longitude covered, degrees (360 for a full turn).</param>
/// <param name="VerticalDeg">Latitude covered, degrees.</param>
/// <param name="BottomDeg">Lowest latitude seen, degrees (up is positive).</param>
/// <param name="TopDeg">Highest latitude seen, degrees.</param>
/// <param name="CentreLongitudeDeg">Middle of the covered longitudes, degrees (0: the world's z axis).</param>
/// <param name="Projection">Suggested projection.</param>
/// <param name="CanvasWidth">Canvas width in that projection, px.</param>
/// <param name="CanvasHeight">Canvas height, px.</param>
public sealed record AngularExtent(double HorizontalDeg, double VerticalDeg, double BottomDeg, double TopDeg, double CentreLongitudeDeg,
    StitchProjection Projection, int CanvasWidth, int CanvasHeight)
{
    private const int SamplesPerSide = 16;

    /// <summary>Longitude (radians, from z towards x) and latitude (radians, up positive) of a world ray (y down).</summary>
    public static (double Longitude, double Latitude) Angles(double x, double y, double z) =>
        (Math.Atan2(x, z), Math.Atan2(-y, Math.Sqrt(x * x + z * z)));

    public static AngularExtent Of(IReadOnlyList<CameraPose> poses, IReadOnlyList<(int Width, int Height)> sizes)
    {
        ArgumentNullException.ThrowIfNull(poses);
        ArgumentNullException.ThrowIfNull(sizes);
        var intervals = new List<(double Start, double End)>();
        double bottom = double.PositiveInfinity, top = double.NegativeInfinity;
        bool fullTurn = false;
        double focal = poses.Count == 0 ? 1 : poses.Select(p => p.FocalPx).Order().ElementAt(poses.Count / 2);
        for (int p = 0; p < poses.Count; p++)
        {
            var pose = poses[p];
            var (w, h) = sizes[p];
            var (cLon, _) = Angles(pose.Rotation.M13, pose.Rotation.M23, pose.Rotation.M33);
            double lo = 0, hi = 0;
            foreach (var (u, v) in Border(w, h))
            {
                var (x, y, z) = pose.Ray(u, v);
                var (lon, lat) = Angles(x, y, z);
                double rel = Wrap(lon - cLon);
                lo = Math.Min(lo, rel);
                hi = Math.Max(hi, rel);
                bottom = Math.Min(bottom, lat);
                top = Math.Max(top, lat);
            }
            // A pole inside the image: every longitude is seen.
            foreach (double sign in new[] { -1.0, 1.0 })
            {
                var (px, py, pz) = pose.Rotation.Transpose().Apply(0, sign, 0);
                if (pz > 0 && Math.Abs(pose.FocalPx * px / pz) <= (w - 1) / 2.0 && Math.Abs(pose.FocalPx * py / pz) <= (h - 1) / 2.0)
                {
                    fullTurn = true;
                    if (sign < 0)
                    {
                        top = Math.PI / 2;
                    }
                    else
                    {
                        bottom = -Math.PI / 2;
                    }
                }
            }
            intervals.Add((cLon + lo, cLon + hi));
        }
        var (covered, centre) = fullTurn ? (2 * Math.PI, 0.0) : Coverage(intervals);
        double hDeg = covered * 180 / Math.PI, vDeg = poses.Count == 0 ? 0 : (top - bottom) * 180 / Math.PI;
        var projection = hDeg >= 300 || top > 1.3 || bottom < -1.3 ? StitchProjection.Equirectangular
            : hDeg > 120 ? StitchProjection.Cylindrical : StitchProjection.Rectilinear;
        double width, height;
        switch (projection)
        {
            case StitchProjection.Equirectangular:
                width = focal * covered;
                height = focal * (top - bottom);
                break;
            case StitchProjection.Cylindrical:
                width = focal * covered;
                height = focal * (Math.Tan(top) - Math.Tan(bottom));
                break;
            default:
                width = 2 * focal * Math.Tan(covered / 2);
                height = focal * (Math.Tan(top) - Math.Tan(bottom));
                break;
        }
        return new AngularExtent(Math.Round(hDeg, 3), Math.Round(vDeg, 3), Math.Round(bottom * 180 / Math.PI, 3), Math.Round(top * 180 / Math.PI, 3),
            Math.Round(centre * 180 / Math.PI, 3), projection, (int)Math.Ceiling(Math.Max(width, 1)), (int)Math.Ceiling(Math.Max(height, 1)));
    }

    /// <summary>Longitude covered by the union of intervals on the circle (2 pi less the largest gap) and the middle of the covered arc.</summary>
    private static (double Covered, double Centre) Coverage(List<(double Start, double End)> intervals)
    {
        if (intervals.Count == 0)
        {
            return (0, 0);
        }
        // Normalise starts to [0, 2 pi), sort, merge; the largest gap between merged arcs (with wrap) is uncovered.
        var arcs = intervals.Select(i => (Start: Mod(i.Start), Length: Math.Min(i.End - i.Start, 2 * Math.PI))).OrderBy(a => a.Start).ToList();
        var merged = new List<(double Start, double End)>();
        foreach (var (s, len) in arcs)
        {
            if (merged.Count > 0 && s <= merged[^1].End)
            {
                merged[^1] = (merged[^1].Start, Math.Max(merged[^1].End, s + len));
            }
            else
            {
                merged.Add((s, s + len));
            }
        }
        // Merge the last with the first across the wrap.
        if (merged.Count > 1 && merged[^1].End >= merged[0].Start + 2 * Math.PI)
        {
            merged[0] = (merged[^1].Start - 2 * Math.PI, Math.Max(merged[0].End, merged[^1].End - 2 * Math.PI));
            merged.RemoveAt(merged.Count - 1);
        }
        if (merged.Count == 1 && merged[0].End - merged[0].Start >= 2 * Math.PI)
        {
            return (2 * Math.PI, 0);
        }
        double largestGap = -1, gapEnd = 0;
        for (int i = 0; i < merged.Count; i++)
        {
            double end = merged[i].End;
            double nextStart = i + 1 < merged.Count ? merged[i + 1].Start : merged[0].Start + 2 * Math.PI;
            double gap = nextStart - end;
            if (gap > largestGap)
            {
                largestGap = gap;
                gapEnd = nextStart;
            }
        }
        double covered = 2 * Math.PI - Math.Max(largestGap, 0);
        return (covered, Wrap(gapEnd + covered / 2));
    }

    private static IEnumerable<(double U, double V)> Border(int w, int h)
    {
        for (int k = 0; k <= SamplesPerSide; k++)
        {
            double t = (double)k / SamplesPerSide;
            yield return (t * (w - 1), 0);
            yield return (t * (w - 1), h - 1);
            yield return (0, t * (h - 1));
            yield return (w - 1, t * (h - 1));
        }
    }

    private static double Wrap(double a) => Math.IEEERemainder(a, 2 * Math.PI);

    private static double Mod(double a)
    {
        double m = a % (2 * Math.PI);
        return m < 0 ? m + 2 * Math.PI : m;
    }
}
